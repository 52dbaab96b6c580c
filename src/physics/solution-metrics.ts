/**
 * How far one solution is from another (a network from the spectral reference), on the
 * reference grid. Plain discrete norms over the periodic grid points:
 *   relative L2 of u against r:  ‖u − r‖₂ / ‖r‖₂,   max error: max |u − r|.
 * Both solutions must share the cell (L, nx); the caller resamples otherwise.
 */
import type { ScftSolution } from './result.js';

export interface SolutionMetrics {
  phiA: { relativeL2: number; maxError: number };
  exchangeField: { relativeL2: number; maxError: number };
  /** Relative error of Q (both normalised to the same gauge). */
  QRelativeError: number;
  /** F − F_reference, kT per chain. */
  freeEnergyError: number;
  /** Incompressibility of the candidate: max |φA + φB − 1|. */
  incompressibilityMax: number;
}

export function relL2(u: ArrayLike<number>, r: ArrayLike<number>): number {
  let num = 0;
  let den = 0;
  for (let j = 0; j < r.length; j++) {
    num += (u[j] - r[j]) ** 2;
    den += r[j] ** 2;
  }
  return Math.sqrt(num / den);
}

function maxAbs(u: ArrayLike<number>, r: ArrayLike<number>): number {
  let m = 0;
  for (let j = 0; j < r.length; j++) m = Math.max(m, Math.abs(u[j] - r[j]));
  return m;
}

export function compareSolutions(candidate: ScftSolution, reference: ScftSolution): SolutionMetrics {
  if (candidate.nx !== reference.nx || Math.abs(candidate.length - reference.length) > 1e-9 * reference.length) {
    throw new Error(`compareSolutions: grids differ (nx ${candidate.nx} vs ${reference.nx}, L ${candidate.length} vs ${reference.length})`);
  }
  const nx = reference.nx;
  const exC = new Float64Array(nx);
  const exR = new Float64Array(nx);
  let incompressibilityMax = 0;
  for (let j = 0; j < nx; j++) {
    exC[j] = candidate.w.A[j] - candidate.w.B[j];
    exR[j] = reference.w.A[j] - reference.w.B[j];
    incompressibilityMax = Math.max(incompressibilityMax, Math.abs(candidate.phi.A[j] + candidate.phi.B[j] - 1));
  }
  return {
    phiA: { relativeL2: relL2(candidate.phi.A, reference.phi.A), maxError: maxAbs(candidate.phi.A, reference.phi.A) },
    exchangeField: { relativeL2: relL2(exC, exR), maxError: maxAbs(exC, exR) },
    QRelativeError: Math.abs(candidate.Q / reference.Q - 1),
    freeEnergyError: candidate.freeEnergy - reference.freeEnergy,
    incompressibilityMax,
  };
}

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
  /** Incompressibility of the candidate: max |φA + φB − 1|; absent for a chain in prescribed fields, where φA + φB = 1 is no constraint. */
  incompressibilityMax?: number;
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

/**
 * The one same-grid check: why two solutions cannot be compared point by point (another
 * grid size, cell length or cell kind), or null when they can. Lengths agree to 1e-9 relative.
 */
export function gridMismatch(a: Pick<ScftSolution, 'nx' | 'length' | 'cell'>, b: Pick<ScftSolution, 'nx' | 'length' | 'cell'>): string | null {
  if (a.nx !== b.nx) return `nx = ${a.nx} against nx = ${b.nx}`;
  if (Math.abs(a.length - b.length) > 1e-9 * Math.max(1, Math.abs(b.length))) return `cell length ${a.length} Rg against ${b.length} Rg`;
  if (a.cell.kind !== b.cell.kind) return `a ${a.cell.kind} cell against a ${b.cell.kind} cell`;
  return null;
}

/**
 * ln Q + the gauge (the mean of the fields of the species present): a constant shift c of
 * every field multiplies Q by e^{−c} and adds c to the mean, so this is the gauge-free Q of a
 * self-consistent solution. Prescribed fields have no gauge freedom: plain ln Q.
 */
function gaugeFreeLogQ(s: ScftSolution): number {
  if (s.system.externalField) return Math.log(s.Q);
  const present = (['A', 'B'] as const).filter((k) => s.phi[k].some((v) => v !== 0));
  let g = 0;
  for (const k of present) g += s.cell.mean(s.w[k]);
  return Math.log(s.Q) + (present.length > 0 ? g / present.length : 0);
}

export function compareSolutions(candidate: ScftSolution, reference: ScftSolution): SolutionMetrics {
  const mismatch = gridMismatch(candidate, reference);
  if (mismatch) throw new Error(`compareSolutions: grids differ (${mismatch})`);
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
    QRelativeError: Math.abs(Math.exp(gaugeFreeLogQ(candidate) - gaugeFreeLogQ(reference)) - 1),
    freeEnergyError: candidate.freeEnergy - reference.freeEnergy,
    ...(reference.system.externalField ? {} : { incompressibilityMax }),
  };
}

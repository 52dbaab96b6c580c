/**
 * The surrogate's error at held-out parameter points, against fresh reference solves at
 * their own equilibrium period L_ref(θ).
 *
 * Profiles are compared on the fractional coordinate t = x/L: the reference grid
 * x_j = j·L_ref/nx and the surrogate at x_j = j·L(θ)/nx share t_j = j/nx, so the profile
 * error is separate from the period error (L(θ) − L_ref)/L_ref, reported on its own. Norms and
 * the F and Q errors are those of physics/solution-metrics.ts.
 *
 * Baseline: the anchors' reference φ_A(t) interpolated (multilinearly, on the t grid) to
 * the held-out point, so the network can be judged against the cheapest alternative use of
 * the same reference solves.
 */
import { compareSolutions, relL2 } from '../physics/solution-metrics.js';
import type { ScftSolution } from '../physics/result.js';
import type { ParameterPoint, ParameterSpace } from './parameter-space.js';
import { ParameterSpace as Space } from './parameter-space.js';
import type { ReferencePoint } from './surrogate-training.js';

export interface HeldOutError {
  point: ParameterPoint;
  phiA: { relativeL2: number; maxError: number };
  exchangeFieldRelativeL2: number;
  /** F_surrogate − F_reference, kT per chain. */
  freeEnergyError: number;
  QRelativeError: number;
  period: { surrogate: number; reference: number; relativeError: number };
  /** φ_A relative L2 error of the anchors' profiles interpolated to this point. */
  anchorInterpolationPhiA: number;
}

/** The surrogate's solution moved onto the reference's cell (same t_j = j/nx), for comparing profiles. */
export function onReferenceCell(sol: ScftSolution, ref: ScftSolution): ScftSolution {
  if (sol.nx !== ref.nx) throw new Error(`onReferenceCell: nx ${sol.nx} vs ${ref.nx}`);
  return { ...sol, cell: ref.cell, length: ref.length, period: ref.period, x: ref.x, notes: [...sol.notes, `drawn on the reference cell at t = x/L* (L* = ${ref.period.toFixed(6)} Rg); the surrogate's own period is L(θ) = ${sol.period.toFixed(6)} Rg`] };
}

/** Multilinear interpolation of the anchors' φ_A(t) at p (anchors in ParameterSpace.anchors() order). */
export function interpolateAnchors(space: ParameterSpace, anchors: ReferencePoint[], p: ParameterPoint): Float64Array {
  const values = space.axes.map((a) => Space.axisValues(a));
  let out: Float64Array | null = null;
  const corners = 1 << space.dimension;
  for (let c = 0; c < corners; c++) {
    let weight = 1;
    let index = 0;
    let stride = 1;
    space.axes.forEach((a, d) => {
      const v = values[d];
      let i = 0;
      while (i < v.length - 2 && p[a.name] > v[i + 1]) i++;
      const s = Math.min(1, Math.max(0, (p[a.name] - v[i]) / (v[i + 1] - v[i])));
      const upper = (c >> d) & 1;
      weight *= upper ? s : 1 - s;
      index += (i + upper) * stride;
      stride *= v.length;
    });
    if (weight === 0) continue;
    const phi = anchors[index].solution.phi.A;
    out ??= new Float64Array(phi.length);
    for (let j = 0; j < phi.length; j++) out[j] += weight * phi[j];
  }
  return out!;
}

export function heldOutErrors(space: ParameterSpace, surrogate: ScftSolution[], references: ReferencePoint[], anchors: ReferencePoint[]): HeldOutError[] {
  return references.map((r, k) => {
    const ref = r.solution;
    const m = compareSolutions(onReferenceCell(surrogate[k], ref), ref);
    return {
      point: r.point,
      phiA: m.phiA,
      exchangeFieldRelativeL2: m.exchangeField.relativeL2,
      freeEnergyError: m.freeEnergyError,
      QRelativeError: m.QRelativeError,
      period: { surrogate: surrogate[k].period, reference: ref.period, relativeError: surrogate[k].period / ref.period - 1 },
      anchorInterpolationPhiA: relL2(interpolateAnchors(space, anchors, r.point), ref.phi.A),
    };
  });
}

/** Largest and mean of each error over the held-out points. */
export function summarizeErrors(errors: HeldOutError[]) {
  const stat = (f: (e: HeldOutError) => number) => {
    const v = errors.map((e) => Math.abs(f(e)));
    return { max: Math.max(...v), mean: v.reduce((a, b) => a + b, 0) / v.length };
  };
  return {
    points: errors.length,
    phiARelativeL2: stat((e) => e.phiA.relativeL2),
    freeEnergyError: stat((e) => e.freeEnergyError),
    QRelativeError: stat((e) => e.QRelativeError),
    periodRelativeError: stat((e) => e.period.relativeError),
    anchorInterpolationPhiA: stat((e) => e.anchorInterpolationPhiA),
  };
}

/**
 * The phase convention of a lamella in a periodic cell, applied to every solution the tool
 * writes (reference, network, surrogate, resumed runs, inversions): the centre of an A-rich
 * domain sits at x = 0.
 *
 * Units: x in Rg. SCFT in a periodic cell is invariant under x → x + δ, so a solver may land
 * on any translate of the lamella (at f = 1/2 the A↔B-swapped one is the same lamella moved by
 * half a period). Mode p (p = the cell's periods) of φ_A carries the lamella; writing it as
 * a cos(k_p x + θ), the translate v(x) = u(x + δ) with δ = −θ/k_p has θ = 0, i.e. its
 * fundamental peaks at x = 0. For the lamellae of linear A/B chains, which are even about
 * their domain centres, that is an A-rich domain's centre (common practice, no source).
 * Of the p equivalent shifts (δ + jL/p) the smallest is taken.
 */
import type { Cell } from './cell/cell.js';
import type { SpeciesArrays } from './fields.js';
import type { Propagators } from './result.js';

/** Below this amplitude of mode p there is no lamella to place (a disordered or uniform φ_A). */
const MIN_AMPLITUDE = 1e-9;

/** The shift δ (Rg) that puts an A-rich domain centre at x = 0, or 0 when the cell has no translation or φ_A has no lamella. */
export function conventionShift(cell: Cell, phiA: Float64Array): number {
  const t = cell.translation;
  if (!t || cell.periods < 1) return 0;
  const { amplitude, phase } = t.mode(phiA, cell.periods);
  if (!(amplitude > MIN_AMPLITUDE)) return 0;
  const k = t.waveNumber(cell.periods);
  const span = cell.length / cell.periods;
  let delta = -phase / k;
  delta -= span * Math.round(delta / span);
  // A shift below round-off of the period is no shift (the symmetric solutions of a mirror-symmetric start).
  return Math.abs(delta) < 1e-12 * cell.length ? 0 : delta;
}

export interface Shiftable {
  phi: SpeciesArrays;
  w: SpeciesArrays;
  propagators?: Propagators;
}

/** The same solution moved by δ: every grid array u(x) → u(x + δ). */
export function shiftSolution<T extends Shiftable>(cell: Cell, sol: T, delta: number): T {
  if (delta === 0 || !cell.translation) return sol;
  const sh = (u: Float64Array) => cell.translation!.shift(u, delta);
  const both = (u: SpeciesArrays): SpeciesArrays => ({ A: sh(u.A), B: sh(u.B) });
  return {
    ...sol,
    phi: both(sol.phi),
    w: both(sol.w),
    ...(sol.propagators ? { propagators: { s: sol.propagators.s, q: sol.propagators.q.map(sh), qDagger: sol.propagators.qDagger.map(sh) } } : {}),
  };
}

/** The solution in the convention (A-rich domain centre at x = 0). */
export function inConvention<T extends Shiftable>(cell: Cell, sol: T): T {
  return shiftSolution(cell, sol, conventionShift(cell, sol.phi.A));
}

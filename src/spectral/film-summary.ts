/**
 * What `solve` reports for a film (lengths in Rg, energies in kT per chain; per area in
 * kT ρ₀Rg/N, see docs/physics.md): the keys scripts rely on, built once from a film solve.
 * Only converged, grid-independent quantities are reported (the film cell has no wall layer, so
 * F itself converges with the grid: docs/physics.md, "Films").
 */
import type { ReferenceSolve } from './solve-from-config.js';

export interface FilmSummary {
  thickness: number;
  walls: { bottom: number; top: number; range: number };
  phase: string;
  freeEnergy: number;
  freeEnergyPerArea: number;
  /** The disordered film with the same walls; null when none is distinct from the layered state (surface-induced ordering). */
  freeEnergyDisordered: number | null;
  freeEnergyDisorderedPerArea: number | null;
  /** F − F of the disordered film with the same walls (not the bulk χN f(1 − f)); null as above. */
  freeEnergyExcess: number | null;
  layers: { A: number; B: number; sequence: string };
  Q: number;
  iterations: number;
  residual: number;
  converged: boolean;
  resolution: { nx: number; ns: number; phiError: number; lnQError: number };
  starts: { halfPeriods: number; freeEnergy: number; converged: boolean; phase: string }[];
  notes: string[];
}

export function filmSummary(ref: ReferenceSolve): FilmSummary {
  const film = ref.film;
  if (!film) throw new Error('filmSummary: not a film solve');
  const sol = ref.solution;
  const d = sol.cell.describe();
  if (d.kind !== 'film') throw new Error('filmSummary: not a film cell');
  const H = d.length;
  const distinct = Number.isFinite(sol.freeEnergyDisordered);
  return {
    thickness: H,
    walls: { bottom: d.walls.bottom.affinity, top: d.walls.top.affinity, range: d.walls.range },
    phase: sol.phase,
    freeEnergy: sol.freeEnergy,
    freeEnergyPerArea: film.freeEnergyPerArea,
    freeEnergyDisordered: distinct ? sol.freeEnergyDisordered : null,
    freeEnergyDisorderedPerArea: distinct ? sol.freeEnergyDisordered * H : null,
    freeEnergyExcess: distinct ? sol.freeEnergy - sol.freeEnergyDisordered : null,
    layers: { A: film.layers.A, B: film.layers.B, sequence: film.layers.sequence },
    Q: sol.Q,
    iterations: sol.iterations,
    residual: sol.residual,
    converged: sol.converged,
    resolution: { nx: ref.resolution.nx, ns: ref.resolution.ns, phiError: ref.resolution.error.grid.phi + ref.resolution.error.contour.phi, lnQError: ref.resolution.error.grid.lnQ + ref.resolution.error.contour.lnQ },
    starts: film.starts,
    notes: sol.notes,
  };
}

/** The film summary as text lines (stdout of `solve` on a film). */
export function filmSummaryText(s: FilmSummary, chain: string, chiN: number): string[] {
  const g = (v: number, digits = 6) => String(+v.toPrecision(digits));
  return [
    `chain ${chain}, χN = ${g(chiN)}, film of thickness H = ${g(s.thickness)} Rg between walls of affinity ${g(s.walls.bottom)} (bottom) and ${g(s.walls.top)} (top), range ${g(s.walls.range)} Rg`,
    `state: ${s.phase}${s.converged ? '' : ' (NOT CONVERGED)'}, ${s.layers.A} A-rich and ${s.layers.B} B-rich layers (${s.layers.sequence || 'none'}, bottom first)`,
    `F = ${g(s.freeEnergy, 10)} kT per chain (${g(s.freeEnergyPerArea, 10)} kT ρ₀Rg/N per area)${s.freeEnergyDisordered === null || s.freeEnergyExcess === null ? '; no disordered film distinct from this state' : `; disordered film with the same walls: ${g(s.freeEnergyDisordered, 10)} (F − F_disordered = ${s.freeEnergyExcess.toExponential(4)})`}`,
    `Q = ${g(s.Q, 12)}, ${s.iterations} iterations, residual ${s.residual.toExponential(2)} kT; grid ${s.resolution.nx} points × ${s.resolution.ns} contour steps (estimated φA error ${s.resolution.phiError.toExponential(1)}, ln Q ${s.resolution.lnQError.toExponential(1)})`,
    ...s.notes.map((n) => `note: ${n}`),
  ];
}

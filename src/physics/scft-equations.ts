/**
 * The SCFT equations of an incompressible A/B melt (docs/physics.md), in one place: the
 * self-consistent field update and its residual, the gauge, and the free energy. Every solver
 * (spectral, network, surrogate) calls these.
 *
 * Conventions: fields and free energies in kT per chain; cell averages ⟨u⟩ = (1/L)∫u dx are the
 * cell's own quadrature (cell.mean). A cell may carry a surface field h(x) (a film's wall
 * affinity for A: it lowers w_A and raises w_B); a periodic cell has none (h = 0).
 *
 * Self-consistency (the usual pressure-field elimination, e.g. Matsen's reviews of SCFT):
 * at a solution w_A = χN φ_B − h + ξ and w_B = χN φ_A + h + ξ with φ_A + φ_B = 1, so adding
 * them gives ξ = (w_A + w_B − χN)/2. For an input w this ξ defines the output
 *   w_A' = χN φ_B[w] − h + ξ,  w_B' = χN φ_A[w] + h + ξ,
 * and d = w' − w vanishes exactly when both w_A − w_B = χN(φ_B − φ_A) − 2h and
 * φ_A + φ_B = 1 hold (χN > 0). A one-species melt has only the pressure: w' = w + (φ − 1).
 *
 * Free energy per chain (the ξ term vanishes at a solution):
 *   F = −ln Q + ⟨χN φ_A φ_B − h (φ_A − φ_B) − w_A φ_A − w_B φ_B⟩,   Q = ⟨q(x, 1)⟩.
 */
import type { Chain } from './chain.js';
import type { Cell } from './cell/cell.js';
import type { SpeciesArrays } from './fields.js';

/** The constraints the equations need from a cell (periodic cells have neither). */
export type FieldCell = Pick<Cell, 'mean' | 'surfaceField'>;

export interface FieldUpdate {
  /** w' − w per species present on the chain. */
  deviation: SpeciesArrays;
  /** max |w' − w| over species and grid: the stopping measure of the iteration (kT). */
  residual: number;
}

export function fieldDeviation(chain: Chain, chiN: number, w: SpeciesArrays, phi: SpeciesArrays, cell?: FieldCell): FieldUpdate {
  const nx = w.A.length;
  const h = cell?.surfaceField ?? null;
  const d: SpeciesArrays = { A: new Float64Array(nx), B: new Float64Array(nx) };
  let residual = 0;
  if (chain.species.length === 1) {
    const k = chain.species[0];
    for (let j = 0; j < nx; j++) {
      d[k][j] = phi[k][j] - 1;
      residual = Math.max(residual, Math.abs(d[k][j]));
    }
    return { deviation: d, residual };
  }
  for (let j = 0; j < nx; j++) {
    const hj = h ? h[j] : 0;
    const xi = 0.5 * (w.A[j] + w.B[j] - chiN);
    d.A[j] = chiN * phi.B[j] - hj + xi - w.A[j];
    d.B[j] = chiN * phi.A[j] + hj + xi - w.B[j];
    residual = Math.max(residual, Math.abs(d.A[j]), Math.abs(d.B[j]));
  }
  return { deviation: d, residual };
}

/** Plain grid mean: the quadrature of every cell kind on its own grid. */
function gridMean(u: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < u.length; i++) s += u[i];
  return s / u.length;
}

/** Shift all fields by one constant so the mean pressure field (w_A + w_B)/2 is zero (one-species: mean w = 0). */
export function fixGauge(chain: Chain, w: SpeciesArrays, cell?: Pick<Cell, 'mean'>): void {
  const mean = cell ? (u: ArrayLike<number>) => cell.mean(u) : gridMean;
  const shift = chain.species.length === 1 ? mean(w[chain.species[0]]) : 0.5 * (mean(w.A) + mean(w.B));
  for (let j = 0; j < w.A.length; j++) {
    w.A[j] -= shift;
    w.B[j] -= shift;
  }
}

/** F per chain in kT (see the header). */
export function freeEnergy(cell: FieldCell, chiN: number, Q: number, w: SpeciesArrays, phi: SpeciesArrays): number {
  const nx = w.A.length;
  const h = cell.surfaceField;
  const terms = new Float64Array(nx);
  for (let j = 0; j < nx; j++) terms[j] = chiN * phi.A[j] * phi.B[j] - (h ? h[j] * (phi.A[j] - phi.B[j]) : 0) - w.A[j] * phi.A[j] - w.B[j] * phi.B[j];
  return -Math.log(Q) + cell.mean(terms);
}

/**
 * F per chain in kT from the fields alone (the field form of the same free energy): with
 * w_A − w_B = χN(φ_B − φ_A) − 2h, φ_A + φ_B = 1 and ξ = (w_A + w_B − χN)/2 eliminated,
 *   F = −ln Q + ⟨(w_A − w_B + 2h)²/(4χN) − (w_A + w_B)/2⟩ + χN/4
 * (a one-species melt: F = −ln Q − ⟨w⟩). It equals freeEnergy at a solution and, unlike it,
 * is stationary in w there (δF/δw_A = φ_A[w] − φ_A at the self-consistency relation), so an
 * error in the densities does not enter and an error in w enters at second order: the form
 * for a solution whose densities carry an approximation error of their own (a network's),
 * with Q from network/partition-function.ts. Needs χN > 0 for two species (null otherwise:
 * use freeEnergy).
 */
export function fieldFormFreeEnergy(chain: Chain, cell: FieldCell, chiN: number, Q: number, w: SpeciesArrays): number | null {
  const nx = w.A.length;
  const terms = new Float64Array(nx);
  if (chain.species.length === 1) {
    const k = chain.species[0];
    for (let j = 0; j < nx; j++) terms[j] = -w[k][j];
    return -Math.log(Q) + cell.mean(terms);
  }
  if (!(chiN > 0)) return null;
  const h = cell.surfaceField;
  for (let j = 0; j < nx; j++) {
    const ex = w.A[j] - w.B[j] + (h ? 2 * h[j] : 0);
    terms[j] = (ex * ex) / (4 * chiN) - 0.5 * (w.A[j] + w.B[j]);
  }
  return -Math.log(Q) + cell.mean(terms) + chiN / 4;
}

/** Fields that reproduce a target A composition profile φ_A at the self-consistency relation (gauge fixed). */
export function fieldsFromComposition(chain: Chain, chiN: number, phiA: Float64Array, cell?: FieldCell): SpeciesArrays {
  const nx = phiA.length;
  const h = cell?.surfaceField ?? null;
  const w: SpeciesArrays = { A: new Float64Array(nx), B: new Float64Array(nx) };
  for (let j = 0; j < nx; j++) {
    const hj = h ? h[j] : 0;
    w.A[j] = chiN * (1 - phiA[j]) - hj;
    w.B[j] = chiN * phiA[j] + hj;
  }
  fixGauge(chain, w, cell);
  return w;
}

/**
 * One simple-mixing step of the field iteration: w' = w + λ d(w, φ) with d from
 * fieldDeviation, gauge fixed. Returns w' and the residual max |d| of the input (kT).
 */
export function mixedFieldUpdate(chain: Chain, chiN: number, w: SpeciesArrays, phi: SpeciesArrays, mixing: number, cell?: FieldCell): { w: SpeciesArrays; residual: number } {
  const { deviation, residual } = fieldDeviation(chain, chiN, w, phi, cell);
  // A species that is not on the chain has no field to update: it is set to 0 (before the gauge).
  const out = { A: new Float64Array(w.A.length), B: new Float64Array(w.B.length) };
  for (const k of chain.species) for (let j = 0; j < out[k].length; j++) out[k][j] = w[k][j] + mixing * deviation[k][j];
  fixGauge(chain, out, cell);
  return { w: out, residual };
}

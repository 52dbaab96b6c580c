/**
 * The SCFT equations of an incompressible A/B melt (SCFT-NOTES.md), in one place:
 * the self-consistent field update and its residual, the gauge, and the free energy.
 *
 * Conventions: fields and free energies in kT per chain; cell averages (1/L)∫dx are
 * plain grid means (periodic grid, spectrally exact).
 *
 * Field update (the usual pressure-field elimination, e.g. Matsen's reviews of SCFT):
 * at a solution w_A = χN φ_B + ξ and w_B = χN φ_A + ξ with φ_A + φ_B = 1, so adding
 * them gives ξ = (w_A + w_B − χN)/2. For an input w this ξ defines the output
 *   w_A' = χN φ_B[w] + ξ,  w_B' = χN φ_A[w] + ξ,
 * and d = w' − w vanishes exactly when both w_A − w_B = χN(φ_B − φ_A) and
 * φ_A + φ_B = 1 hold. A one-species melt has only the pressure: w' = w + (φ − 1).
 */
import type { Chain } from './chain.js';
import type { SpeciesArrays } from './fields.js';
import { cellMean } from './grid.js';

export interface FieldUpdate {
  /** w' − w per species present on the chain. */
  deviation: SpeciesArrays;
  /** max |w' − w| over species and grid: the stopping measure of the iteration (kT). */
  residual: number;
}

export function fieldDeviation(chain: Chain, chiN: number, w: SpeciesArrays, phi: SpeciesArrays): FieldUpdate {
  const nx = w.A.length;
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
    const xi = 0.5 * (w.A[j] + w.B[j] - chiN);
    d.A[j] = chiN * phi.B[j] + xi - w.A[j];
    d.B[j] = chiN * phi.A[j] + xi - w.B[j];
    residual = Math.max(residual, Math.abs(d.A[j]), Math.abs(d.B[j]));
  }
  return { deviation: d, residual };
}

/** Shift all fields by one constant so the mean pressure field (w_A + w_B)/2 is zero (one-species: mean w = 0). */
export function fixGauge(chain: Chain, w: SpeciesArrays): void {
  const shift = chain.species.length === 1 ? cellMean(w[chain.species[0]]) : 0.5 * (cellMean(w.A) + cellMean(w.B));
  for (let j = 0; j < w.A.length; j++) {
    w.A[j] -= shift;
    w.B[j] -= shift;
  }
}

/** F = −ln Q + (1/L)∫[χN φ_A φ_B − w_A φ_A − w_B φ_B] dx, per chain in kT. */
export function freeEnergy(chiN: number, Q: number, w: SpeciesArrays, phi: SpeciesArrays): number {
  const nx = w.A.length;
  let s = 0;
  for (let j = 0; j < nx; j++) s += chiN * phi.A[j] * phi.B[j] - w.A[j] * phi.A[j] - w.B[j] * phi.B[j];
  return -Math.log(Q) + s / nx;
}

/** Fields that reproduce a target A composition profile φ_A at the self-consistency relation (gauge fixed). */
export function fieldsFromComposition(chain: Chain, chiN: number, phiA: Float64Array): SpeciesArrays {
  const nx = phiA.length;
  const w: SpeciesArrays = { A: new Float64Array(nx), B: new Float64Array(nx) };
  for (let j = 0; j < nx; j++) {
    w.A[j] = chiN * (1 - phiA[j]);
    w.B[j] = chiN * phiA[j];
  }
  fixGauge(chain, w);
  return w;
}

/**
 * One simple-mixing step of the field iteration: w' = w + λ d(w, φ) with d from
 * fieldDeviation, gauge fixed. Returns w' and the residual max |d| of the input (kT).
 */
export function mixedFieldUpdate(chain: Chain, chiN: number, w: SpeciesArrays, phi: SpeciesArrays, mixing: number): { w: SpeciesArrays; residual: number } {
  const { deviation, residual } = fieldDeviation(chain, chiN, w, phi);
  const out = { A: Float64Array.from(w.A), B: Float64Array.from(w.B) };
  for (const k of chain.species) for (let j = 0; j < out[k].length; j++) out[k][j] += mixing * deviation[k][j];
  fixGauge(chain, out);
  return { w: out, residual };
}

/**
 * Grid and contour resolution chosen from the physics, and the solver's own error estimates.
 *
 * Units: lengths in Rg, F in kT per chain, φ dimensionless.
 *
 * Contour: the split-step error grows with the product of the step and the field strength
 * (fields reach ~χN across an interface), so the steps are chosen with χN·h ≤ 0.15 (at least
 * 100 over the chain). Measured on the symmetric diblock (docs/physics.md, "Resolution"):
 * with ns = 100 the period is off by 7e-5 Rg at χN = 30 and 1e-3 Rg at χN = 60 against a
 * 256 × 1600 reference, and 4·χN/0.6 steps bring it below 1e-5 relative.
 * Grid: an A/B interface has width w ≈ Rg/√χN (Helfand & Tagami, J. Polym. Sci. B 9, 741
 * (1971), in units of Rg of the whole chain), and the Fourier coefficients of a tanh profile
 * of width w fall like exp(−π k w/2), so k_max·w ≥ 10 asks for nx ≥ 10·L·√χN/π points
 * (at least 64), rounded up to a power of two. Conformational asymmetry narrows the
 * interface on the side of the shorter segment: the grid scales with max b_K/min b_K.
 *
 * Check: after a solve, one more propagator solve in the converged fields at twice the steps
 * (the Richardson estimate: a fourth-order error falls sixteen-fold, so the difference is
 * 15/16 of the coarse error) and one at twice the grid points (spectral: the difference is
 * the coarse grid's error) measure what the chosen resolution costs in φ_A and ln Q.
 */
import type { Chain } from '../physics/chain.js';
import type { Cell } from '../physics/cell/cell.js';
import { contourFromSteps } from '../physics/contour.js';
import type { Contour } from '../physics/contour.js';
import type { SpeciesArrays } from '../physics/fields.js';
import { PropagatorSolver } from './propagator-solver.js';

/** χN·h at most this (h the contour step). */
const CONTOUR_STEP_TIMES_CHIN = 0.15;
const MIN_STEPS = 100;
const MIN_POINTS = 64;
const MAX_POINTS = 2048;
const MAX_STEPS = 20000;

/**
 * Accuracy the automatic choice is held to, on the solver's own estimates: φ_A to 1e-5 and ln Q
 * (so F per chain, in kT) to 1e-6. Measured at χN = 15 (f = 0.5): 64 × 100 meets it (estimates
 * 1.3e-6 and 4.4e-7; against 256 × 1600 the period is off by 2.7e-6 Rg and F by 4.4e-7 kT).
 */
export const RESOLUTION_TARGET = { phi: 1e-5, lnQ: 1e-6 } as const;

export function defaultContourSteps(chain: Chain, chiN: number): number {
  const steps = Math.ceil(Math.max(chiN, 1) / CONTOUR_STEP_TIMES_CHIN);
  return Math.min(MAX_STEPS, Math.max(MIN_STEPS, 2 * Math.ceil(steps / 2)));
}

export function defaultGridPoints(chain: Chain, chiN: number, length: number): number {
  const lengths = chain.blocks.map((b) => b.segmentLength);
  const asym = Math.max(...lengths) / Math.min(...lengths);
  const want = (10 * length * Math.sqrt(Math.max(chiN, 1)) * asym) / Math.PI;
  let n = MIN_POINTS;
  while (n < want && n < MAX_POINTS) n *= 2;
  return n;
}

/**
 * A film of thickness H holds the same interfaces as a periodic cell (the even extension is a
 * periodic cell of length 2H with 2n points), and its surface field of range λ needs a few
 * points across: n ≥ max(10·H·√χN/π, 4H/λ), a power of two, at least 32.
 */
export function defaultFilmPoints(chain: Chain, chiN: number, thickness: number, range: number): number {
  const lengths = chain.blocks.map((b) => b.segmentLength);
  const asym = Math.max(...lengths) / Math.min(...lengths);
  const want = Math.max((10 * thickness * Math.sqrt(Math.max(chiN, 1)) * asym) / Math.PI, (4 * thickness) / range);
  let n = 32;
  while (n < want && n < MAX_POINTS) n *= 2;
  return n;
}

export interface ResolutionError {
  /** max |Δφ_A| and |Δ ln Q| between the solution's contour and twice its steps. */
  contour: { phi: number; lnQ: number };
  /** The same between the solution's grid and twice its points. */
  grid: { phi: number; lnQ: number };
}

function densities(chain: Chain, cell: Cell, contour: Contour, w: SpeciesArrays): { phiA: Float64Array; lnQ: number } {
  const s = new PropagatorSolver(chain, cell, contour);
  s.setFields(w);
  const d = s.solve();
  return { phiA: d.phi.A, lnQ: Math.log(d.Q) };
}

/** The solver's own error estimates for fields w on (cell, contour); see the header. */
export function resolutionError(chain: Chain, cell: Cell, contour: Contour, w: SpeciesArrays): ResolutionError {
  const base = densities(chain, cell, contour, w);
  const finer = densities(chain, cell, contourFromSteps(chain, contour.blocks.map((b) => 2 * b.steps)), w);
  const maxDiff = (a: ArrayLike<number>, b: ArrayLike<number>) => {
    let m = 0;
    for (let j = 0; j < a.length; j++) m = Math.max(m, Math.abs(a[j] - b[j]));
    return m;
  };
  const fine = cell.withPoints(2 * cell.n);
  const wFine = { A: cell.resample(w.A, fine.n), B: cell.resample(w.B, fine.n) };
  const onFine = densities(chain, fine, contour, wFine);
  const back = fine.resample(onFine.phiA, cell.n);
  return {
    contour: { phi: (16 / 15) * maxDiff(base.phiA, finer.phiA), lnQ: (16 / 15) * Math.abs(base.lnQ - finer.lnQ) },
    grid: { phi: maxDiff(base.phiA, back), lnQ: Math.abs(base.lnQ - onFine.lnQ) },
  };
}

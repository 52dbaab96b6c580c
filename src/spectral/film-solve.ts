/**
 * A film between walls (physics/cell/film-cell.ts): its ordered state, its disordered state
 * with the same walls, the verdict between them and the layers.
 *
 * Units: z and H in Rg, F in kT per chain, F per area in kT ρ₀Rg/N (docs/physics.md, "Films").
 * Near a preferential wall even the disordered melt is not uniform, so the film's disordered
 * reference is solved, not taken from the bulk χN f(1 − f): the iteration from a uniform
 * composition (fields from self-consistency with the walls' surface field) converges to the
 * disordered film, whose composition varies only near the walls; it is solved by Newton's
 * method (newton-solve.ts), which converges to it even where it is unstable (a mixing
 * iteration leaves it along its unstable modes). The ordered state is
 * the best of lamellar starts with the number of half-periods that fits H (cell.startPattern)
 * and its neighbours of the parity the walls allow. The lower free energy wins; "disordered"
 * when no ordered start ends below the disordered film.
 */
import type { SystemSpec } from '../physics/chain-schema.js';
import { buildChain } from '../physics/chain.js';
import type { Chain } from '../physics/chain.js';
import type { FilmCell } from '../physics/cell/film-cell.js';
import type { Contour } from '../physics/contour.js';
import type { SpeciesArrays } from '../physics/fields.js';
import type { ScftSolution } from '../physics/result.js';
import { fieldsFromComposition } from '../physics/scft-equations.js';
import { spinodal } from '../physics/rpa.js';
import type { SpectralOptions } from '../io/schemas/spectral-schema.js';
import { bulkPeriodGuess, contourOf, defaultSpectralOptions, solveFixedCell } from './scft-solver.js';
import { solveByNewton } from './newton-solve.js';

export interface FilmLayers {
  /** A-rich layers (runs of φ_A > φ_B along z) and B-rich layers, from the bottom wall up. */
  A: number;
  B: number;
  /** 'A' or 'B' for each layer, bottom first. */
  sequence: string;
}

export interface FilmSolve {
  /** The film's state (lowest F); its freeEnergyDisordered is the disordered film's F. */
  solution: ScftSolution;
  /** The disordered film with the same walls. */
  disordered: ScftSolution;
  layers: FilmLayers;
  /** F·H: free energy per unit area, kT ρ₀Rg/N (chains per area ρ₀H/N times F per chain). */
  freeEnergyPerArea: number;
  /** Every start tried: its half-periods m (0: the uniform start), F and whether it converged. */
  starts: { halfPeriods: number; freeEnergy: number; converged: boolean; phase: string }[];
  /** Every converged state the starts reached (the disordered film first): a fit to data may need one that is not the lowest. */
  states: ScftSolution[];
}

export interface FilmRequest {
  system: SystemSpec;
  cell: FilmCell;
  contour: number | Contour;
  options?: Partial<SpectralOptions>;
  /** Fields of an earlier film solution to try as one more start (a thickness scan's neighbour). */
  initial?: SpeciesArrays;
  keepPropagators?: boolean;
  /** Progress: called at each field iteration of each start (and each continuation stage of the disordered film). */
  onStep?: (step: FilmSolveStep) => void;
}

/** Where a film solve is, for a progress line: which start, its iteration and residual. */
export interface FilmSolveStep {
  /** This start (from 1; the disordered film is the first) and how many the solve tries. */
  start: number;
  starts: number;
  /** What the start is: the disordered film, or a lamellar start with m half-periods. */
  label: string;
  /** Step of this start: its field iteration (the disordered film: its field iterations, then one per Newton stage). */
  iteration: number;
  /** The most iterations this start may take. */
  maxIterations: number;
  /** Residual max |w_out − w|, kT; the start has converged below `tolerance`. */
  residual: number;
  tolerance: number;
}

/** Below this |φ_A − φ_B| a point belongs to no layer (a mixed melt, or an interface). */
const LAYER_CONTRAST = 0.02;

/** Layers: runs of the sign of φ_A − φ_B along z, where the contrast is clear. */
export function countLayers(phi: SpeciesArrays): FilmLayers {
  let sequence = '';
  for (let j = 0; j < phi.A.length; j++) {
    const d = phi.A[j] - phi.B[j];
    if (Math.abs(d) < LAYER_CONTRAST) continue;
    const k = d > 0 ? 'A' : 'B';
    if (sequence[sequence.length - 1] !== k) sequence += k;
  }
  return { A: [...sequence].filter((c) => c === 'A').length, B: [...sequence].filter((c) => c === 'B').length, sequence };
}

function lamellarStart(chain: Chain, chiN: number, cell: FilmCell, halfPeriods: number, sign: number, amplitude = 0.3): SpeciesArrays {
  const f = chain.speciesFraction.A;
  const a = Math.min(amplitude, 0.95 * Math.min(f, 1 - f));
  const k = (Math.PI * halfPeriods) / cell.length;
  const phiA = Float64Array.from(cell.x, (z) => f + a * sign * Math.cos(k * z));
  return fieldsFromComposition(chain, Math.max(chiN, 1), phiA, cell);
}

/**
 * The disordered film with these walls: where the disordered melt is stable (χN below half the
 * bulk spinodal) a mixing iteration from the uniform composition converges to it; above, it is
 * carried up in χN by Newton's method (which follows it past the spinodal, where it turns
 * unstable), each step started from the last with the fields scaled by the χN ratio.
 */
/** Largest χN ratio of one continuation stage of the disordered film. */
const MAX_STEP_RATIO = 1.5;

export function disorderedFilm(req: FilmRequest, chain: Chain, contour: Contour, progressStarts = 1): ScftSolution {
  const cell = req.cell;
  const chiN = req.system.chiN;
  const f = chain.speciesFraction.A;
  const uniform = (x: number) => fieldsFromComposition(chain, x, new Float64Array(cell.n).fill(f), cell);
  const stable = chain.species.length < 2 ? chiN : Math.min(chiN, 0.5 * spinodal(chain).chiN);
  const { tolerance, maxIterations } = defaultSpectralOptions(req.options);
  const report = (label: string) => (iteration: number, residual: number) => req.onStep?.({ start: 1, starts: progressStarts, label: `the disordered film: ${label}`, iteration, maxIterations, residual, tolerance });
  let sol = solveFixedCell({ ...req, contour, system: { ...req.system, chiN: stable }, initial: uniform(stable), onIteration: report(`field iterations at χN = ${+stable.toPrecision(4)}`) });
  let at = stable;
  let ratio = MAX_STEP_RATIO;
  let stage = sol.iterations;
  while (at < chiN && sol.converged) {
    const next = Math.min(chiN, at * ratio);
    const start = { A: sol.w.A.map((v) => (v * next) / at), B: sol.w.B.map((v) => (v * next) / at) };
    // Intermediate stages need only be close enough to start the next one.
    const options = { ...req.options, tolerance: next < chiN ? Math.max(tolerance, 1e-6) : tolerance };
    const trial = solveByNewton({ ...req, options, contour, system: { ...req.system, chiN: next }, start });
    report(`Newton continuation, χN = ${+next.toPrecision(4)} of ${chiN}`)(++stage, trial.residual);
    if (trial.converged) {
      sol = trial;
      at = next;
      ratio = Math.min(MAX_STEP_RATIO, ratio * ratio);
    } else if ((ratio = Math.sqrt(ratio)) < 1.005) {
      return trial;
    }
  }
  return sol;
}

/** Spread of φ_A that counts as order in a film's interior (its middle half). */
const INTERIOR_ORDER = 0.05;
/** Iterations allowed to the neighbouring starts (frustrated layer counts converge slowly and lie higher). */
const NEIGHBOUR_ITERATIONS = 400;

/** max φ_A − min φ_A over the middle half of the film: order that the walls alone do not make. */
export function interiorSpread(cell: FilmCell, phiA: Float64Array): number {
  let lo = Infinity;
  let hi = -Infinity;
  cell.x.forEach((z, j) => {
    if (z < cell.length / 4 || z > (3 * cell.length) / 4) return;
    lo = Math.min(lo, phiA[j]);
    hi = Math.max(hi, phiA[j]);
  });
  return hi - lo;
}

export function solveFilm(req: FilmRequest): FilmSolve {
  const chain = buildChain(req.system.chain);
  const contour = contourOf(chain, req.contour);
  const chiN = req.system.chiN;
  const cell = req.cell;
  const solve = (initial: SpeciesArrays, maxIterations: number | undefined, onIteration: (iteration: number, residual: number) => void) =>
    solveFixedCell({ ...req, contour, initial, options: maxIterations ? { ...req.options, maxIterations } : req.options, onIteration });
  // The lamellar starts are chosen first, so that progress can count them from the start.
  const tries: [number, SpeciesArrays, number | undefined][] = [];
  if (chain.species.length === 2 && !req.system.externalField) {
    const base = cell.startPattern(bulkPeriodGuess(chain, chiN));
    const m0 = Math.round((base.waveNumber * cell.length) / Math.PI);
    const sign = Math.sign(base.pattern[0]) || 1;
    const fixedParity = cell.walls.bottom.affinity !== 0 && cell.walls.top.affinity !== 0;
    const step = fixedParity ? 2 : 1;
    tries.push(...[m0, m0 + step, m0 - step].filter((v) => v >= 1).map((m, i): [number, SpeciesArrays, number | undefined] => [m, lamellarStart(chain, chiN, cell, m, sign), i === 0 ? undefined : NEIGHBOUR_ITERATIONS]));
    if (req.initial) tries.push([-1, req.initial, undefined]);
  }
  const disordered = disorderedFilm(req, chain, contour, 1 + tries.length);
  const starts: FilmSolve['starts'] = [{ halfPeriods: 0, freeEnergy: disordered.freeEnergy, converged: disordered.converged, phase: 'disordered' }];
  const candidates: ScftSolution[] = disordered.converged ? [disordered] : [];
  const { tolerance, maxIterations: iterationCap } = defaultSpectralOptions(req.options);
  for (const [i, [m, w0, cap]] of tries.entries()) {
    const maxIterations = cap ?? iterationCap;
    const label = m < 0 ? 'the given start' : `a start with ${m} half-periods`;
    const sol = solve(w0, cap, (iteration, residual) => req.onStep?.({ start: i + 2, starts: 1 + tries.length, label, iteration, maxIterations, residual, tolerance }));
    starts.push({ halfPeriods: m, freeEnergy: sol.freeEnergy, converged: sol.converged, phase: sol.phase });
    if (sol.converged) candidates.push(sol);
  }
  const chosen = [...candidates].sort((a, b) => a.freeEnergy - b.freeEnergy)[0] ?? disordered;
  const sameState = (a: ScftSolution, b: ScftSolution) => a.phi.A.every((v, j) => Math.abs(v - b.phi.A[j]) < 1e-4);
  // The disordered film is a reference only when it is a state of its own: below the bulk
  // spinodal the branch from the uniform melt crosses no instability, so it is the disordered
  // film whatever oscillations the walls induce; above it, only while its interior stays
  // disordered. With preferential walls and a commensurate thickness that branch can turn
  // continuously into the layered film (surface-induced ordering), and then there is no
  // disordered film to compare with.
  const belowSpinodal = chain.species.length === 2 && chiN < spinodal(chain).chiN;
  const disorderedDistinct = disordered.converged && (belowSpinodal || interiorSpread(cell, disordered.phi.A) < INTERIOR_ORDER);
  const fDis = disorderedDistinct ? disordered.freeEnergy : Number.NaN;
  const isDisordered = disorderedDistinct && (chosen === disordered || sameState(chosen, disordered));
  const phase = req.system.externalField ? 'single-chain' : chain.species.length === 1 ? 'homogeneous-melt' : isDisordered ? 'disordered' : 'lamellar';
  const notes = [...chosen.notes];
  if (!disordered.converged) notes.push('the disordered film (from the uniform melt) did not converge: F_disordered is not available');
  else if (!disorderedDistinct) notes.push('no disordered film distinct from the layered one: the state reached from the uniform melt is layered through the film (surface-induced ordering between these walls), so F_disordered is not given');
  const solution: ScftSolution = { ...chosen, phase, freeEnergyDisordered: fDis, notes };
  return {
    solution,
    disordered: { ...disordered, phase: 'disordered', freeEnergyDisordered: fDis },
    layers: countLayers(solution.phi),
    freeEnergyPerArea: solution.freeEnergy * cell.length,
    starts,
    states: candidates,
  };
}

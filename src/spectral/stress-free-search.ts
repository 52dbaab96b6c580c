/**
 * The stress-free cell length: the root of g(L) = dF/dL (period-stress.ts), the one method by
 * which both `solve` and the inverse tools find the equilibrium lamellar period.
 *
 * Units: L in Rg (the cell length), F in kT per chain.
 * Method: a safeguarded secant iteration on g, each trial a fixed-cell SCFT solve
 * warm-started from the last ordered solution (F is stationary in the fields, so g costs two
 * single-chain solves per trial). Steps are limited to ±`maxStep` of L; once two trials bracket
 * the root (g changes sign) every step stays inside the bracket, falling back to bisection
 * when the secant would leave it (the safeguard of Brent's and Dekker's root finders). A trial that collapses to the disordered state (the weak lamella near the
 * order–disorder transition exists only near its own period) halves the step and retries.
 * g increases through its root at a minimum of F(L), so the slope used must be positive: a
 * non-positive secant slope keeps the previous one.
 */
import type { ScftSolution } from '../physics/result.js';
import type { SpeciesArrays } from '../physics/fields.js';

export interface StressSearchOps {
  /** A converged fixed-cell solve at cell length L, warm-started from `initial` (throws when it does not converge). */
  solveAt(length: number, initial: SpeciesArrays | undefined): ScftSolution;
  /** dF/dL (per chain, per Rg of cell length) at cell length L in the fields w (grid values held fixed). */
  stress(length: number, w: SpeciesArrays): number;
  /** Called after each trial (progress, traces). */
  onTrial?(t: StressTrial): void;
}

export interface StressTrial {
  length: number;
  solution: ScftSolution;
  /** dF/dL, or NaN for a disordered trial. */
  stress: number;
}

export interface StressSearchStart {
  length: number;
  /** A solution already at `length` (saves its solve). */
  solution?: ScftSolution;
  initial?: SpeciesArrays;
  /** d²F/dL² from a neighbouring search; default: the fixed-field curvature at the start. */
  slope?: number;
}

export interface StressSearchResult {
  solution: ScftSolution;
  length: number;
  /** The last step |ΔL| taken (Rg): the search's own accuracy on L. */
  lastStep: number;
  /** The secant slope d²F/dL² at the end (for neighbouring searches). */
  slope: number;
  trials: number;
}

export class StressSearchFailure extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'StressSearchFailure';
  }
}

export function findStressFree(ops: StressSearchOps, start: StressSearchStart, relTol: number, maxStep = 0.05, maxTrials = 60): StressSearchResult {
  let trials = 0;
  const trial = (L: number, initial: SpeciesArrays | undefined, given?: ScftSolution): StressTrial => {
    const solution = given ?? ops.solveAt(L, initial);
    trials++;
    const t = { length: L, solution, stress: solution.phase === 'lamellar' ? ops.stress(L, solution.w) : Number.NaN };
    ops.onTrial?.(t);
    return t;
  };
  let cur = trial(start.length, start.initial, start.solution);
  if (cur.solution.phase !== 'lamellar') throw new StressSearchFailure(`the lamella collapses to the disordered state at the starting length ${start.length.toPrecision(7)} Rg`);
  let slope = start.slope && start.slope > 0 ? start.slope : fixedFieldCurvature(ops, cur);
  // Bracket [lo, hi] with g(lo) < 0 < g(hi), once known.
  let lo: StressTrial | undefined = cur.stress < 0 ? cur : undefined;
  let hi: StressTrial | undefined = cur.stress > 0 ? cur : undefined;
  let lastStep = Infinity;
  while (trials < maxTrials) {
    const L = cur.length;
    let step = -cur.stress / slope;
    if (Math.abs(step) <= relTol * L) return { solution: cur.solution, length: L, lastStep: Math.abs(step), slope, trials };
    step = Math.max(-maxStep * L, Math.min(maxStep * L, step));
    if (lo && hi && !(L + step > lo.length && L + step < hi.length)) step = 0.5 * (lo.length + hi.length) - L;
    let next: StressTrial | undefined;
    for (let tries = 0; tries < 8 && trials < maxTrials; tries++, step /= 2) {
      const t = trial(L + step, cur.solution.w);
      if (t.solution.phase === 'lamellar') {
        next = t;
        break;
      }
    }
    if (!next) throw new StressSearchFailure(`the lamella collapses to the disordered state at every trial length near ${L.toPrecision(7)} Rg`);
    const s = (next.stress - cur.stress) / (next.length - L);
    // A secant over a tiny step is dominated by the solver's tolerance: keep the previous slope then.
    if (s > 0 && Number.isFinite(s) && Math.abs(next.length - L) > 1e-6 * L) slope = s;
    if (next.stress < 0) lo = next;
    else if (next.stress > 0) hi = next;
    lastStep = Math.abs(next.length - L);
    cur = next;
    if (next.stress === 0) return { solution: cur.solution, length: cur.length, lastStep, slope, trials };
  }
  throw new StressSearchFailure(`no stress-free length within ${maxTrials} trials (last L = ${cur.length.toPrecision(7)} Rg, dF/dL = ${cur.stress.toExponential(3)}, last step ${lastStep.toExponential(2)} Rg)`);
}

/** d²(−ln Q)/dL² at fixed fields: a positive first slope for the secant when no neighbour has one. */
function fixedFieldCurvature(ops: StressSearchOps, t: StressTrial): number {
  const h = 1e-3 * t.length;
  const c = (ops.stress(t.length + h, t.solution.w) - ops.stress(t.length - h, t.solution.w)) / (2 * h);
  return c > 0 ? c : 1;
}

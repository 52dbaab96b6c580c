/**
 * Continuation in χN for strong segregation: a cold start far above the order–disorder
 * transition may not converge (the fields reach ±χN/2 across interfaces a few grid points
 * wide, and an early iterate overshoots), so the lamella is first solved at a χN where a cold
 * start converges and then carried up in steps, each warm-started from the last with its
 * fields scaled by the χN ratio (w ≈ χN φ across an interface) and, when the period is
 * searched, its cell stretched by the strong-segregation trend (χN ratio)^{1/5}.
 *
 * Units: lengths in Rg, fields in kT per chain. Natural-parameter continuation (Allgower &
 * Georg, Introduction to Numerical Continuation Methods, SIAM 2003, ch. 1); a failed step is
 * retried with half the step in ln χN.
 */
import type { SpeciesArrays } from '../physics/fields.js';
import type { ScftSolution } from '../physics/result.js';

/** χN below which a cold start is trusted (the symmetric diblock converges from a cosine start up to well above it). */
export const COLD_START_CHIN = 40;
/** Largest χN ratio of one step. */
const MAX_RATIO = 1.5;
const MIN_RATIO = 1.02;

export interface ContinuationStep {
  chiN: number;
  /** Cell length at this χN (Rg). */
  length: number;
}

export interface ContinuationOps {
  /** A converged solve at (χN, cell length), warm-started from `initial` when given (throws or returns unconverged on failure). */
  solveAt(chiN: number, length: number, initial: SpeciesArrays | undefined): ScftSolution;
  /** The cell length to try at χN, given the last solution (a period search can return its own). */
  lengthAt(chiN: number, last: { chiN: number; length: number }): number;
}

export class ContinuationFailure extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'ContinuationFailure';
  }
}

function scaled(w: SpeciesArrays, factor: number): SpeciesArrays {
  return { A: Float64Array.from(w.A, (v) => v * factor), B: Float64Array.from(w.B, (v) => v * factor) };
}

/**
 * From a converged ordered solution at `from` up to `target` χN; returns the solution at the
 * target and the stages taken.
 */
export function continueInChiN(ops: ContinuationOps, from: { chiN: number; length: number; solution: ScftSolution }, target: number): { solution: ScftSolution; length: number; stages: ContinuationStep[] } {
  let last = from;
  const stages: ContinuationStep[] = [];
  let ratio = MAX_RATIO;
  while (last.chiN < target) {
    const chiN = Math.min(target, last.chiN * ratio);
    const length = ops.lengthAt(chiN, last);
    let sol: ScftSolution | undefined;
    try {
      sol = ops.solveAt(chiN, length, scaled(last.solution.w, chiN / last.chiN));
    } catch {
      sol = undefined;
    }
    if (sol && sol.converged && sol.phase === 'lamellar') {
      last = { chiN, length: sol.length, solution: sol };
      stages.push({ chiN, length: sol.length });
      ratio = Math.min(MAX_RATIO, ratio * ratio);
      continue;
    }
    ratio = Math.sqrt(ratio);
    if (ratio < MIN_RATIO) throw new ContinuationFailure(`the lamella could not be carried from χN = ${last.chiN.toPrecision(5)} to ${chiN.toPrecision(5)} (steps down to a χN ratio of ${MIN_RATIO})`);
  }
  return { solution: last.solution, length: last.length, stages };
}

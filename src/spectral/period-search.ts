/**
 * The equilibrium (stress-free) lamellar period of a periodic cell holding `periods`
 * periods: the root of dF/dL (stress-free-search.ts) at fixed f and χN.
 *
 * Units: lengths in Rg, F in kT per chain.
 * The first trial is at a guess from the RPA period and the strong-segregation trend. If the
 * melt is disordered there and at ±5 % (F(L) is then flat: no period to find), the result is
 * the disordered solution. At strong segregation, where a cold start far from the answer may
 * not converge, the search continues from the equilibrium at a lower χN (the fields and
 * period carried over), halving the distance to the spinodal at each stage.
 */
import { RunFailure } from '../io/errors.js';
import { buildChain } from '../physics/chain.js';
import type { Chain } from '../physics/chain.js';
import type { PeriodicCell } from '../physics/cell/periodic-cell.js';
import type { SpeciesArrays } from '../physics/fields.js';
import type { ScftSolution } from '../physics/result.js';
import { spinodal } from '../physics/rpa.js';
import { contourWithTotal } from '../physics/contour.js';
import type { FixedCellRequest } from './scft-solver.js';
import { bulkPeriodGuess, contourOf, defaultSpectralOptions, solveFixedCell } from './scft-solver.js';
import { cellStress } from './period-stress.js';
import { findStressFree, StressSearchFailure } from './stress-free-search.js';
import { COLD_START_CHIN, ContinuationFailure, continueInChiN } from './continuation.js';

export interface PeriodTrial {
  period: number;
  freeEnergy: number;
  phase: string;
  iterations: number;
}

export interface PeriodSearchResult {
  solution: ScftSolution;
  /** Equilibrium period (Rg) and the last step of the search on it (Rg). */
  period: number;
  periodTolerance: number;
  evaluations: number;
  totalIterations: number;
  seconds: number;
  /** Every (period, F, phase) evaluated, in order: lets a report draw F(L). */
  trace: PeriodTrial[];
  /** Stages of a continuation in χN before this one (empty when the search started cold). */
  continuation: { chiN: number; period: number }[];
}

export interface PeriodSearchRequest extends Omit<FixedCellRequest, 'cell'> {
  /** The cell (its grid and number of periods; its length is what is searched). */
  cell: PeriodicCell;
  /** Initial period guess in Rg; default from the RPA period and the strong-segregation trend. */
  guess?: number;
  onEvaluation?: (e: { period: number; freeEnergy: number; phase: string; evaluations: number; residual: number }) => void;
}

/** The search's first period: the bulk guess of the solver (scft-solver.ts bulkPeriodGuess). */
export function periodGuess(system: FixedCellRequest['system'], chain: Chain = buildChain(system.chain)): number {
  return bulkPeriodGuess(chain, system.chiN);
}

export function findEquilibriumPeriod(req: PeriodSearchRequest): PeriodSearchResult {
  const t0 = performance.now();
  const options = defaultSpectralOptions(req.options);
  const chain = buildChain(req.system.chain);
  const contour = contourOf(chain, req.contour);
  const p = req.cell.periods;
  const trace: PeriodTrial[] = [];
  let totalIterations = 0;
  const solveAt = (length: number, initial: SpeciesArrays | undefined): ScftSolution => {
    const sol = solveFixedCell({ ...req, options, contour, cell: req.cell.withLength(length), initial, keepPropagators: false });
    totalIterations += sol.iterations;
    trace.push({ period: length / p, freeEnergy: sol.freeEnergy, phase: sol.phase, iterations: sol.iterations });
    req.onEvaluation?.({ period: length / p, freeEnergy: sol.freeEnergy, phase: sol.phase, evaluations: trace.length, residual: sol.residual });
    if (!sol.converged) throw new StressSearchFailure(`the solve at period ${(length / p).toFixed(5)} Rg did not converge (${sol.notes.join('; ')})`);
    return sol;
  };
  const finish = (solution: ScftSolution, period: number, tolerance: number, continuation: PeriodSearchResult['continuation']): PeriodSearchResult => {
    // Re-solving from the converged fields costs one iteration and stores the propagators.
    const final = req.keepPropagators ? solveFixedCell({ ...req, options, contour, cell: req.cell.withLength(period * p), initial: solution.w }) : solution;
    return { solution: final, period, periodTolerance: tolerance, evaluations: trace.length, totalIterations, seconds: (performance.now() - t0) / 1000, trace, continuation };
  };

  const guess = req.guess ?? periodGuess(req.system, chain);
  const search = (start: { length: number; initial?: SpeciesArrays; slope?: number }) =>
    findStressFree({ solveAt, stress: (L, w) => cellStress(chain, contour, req.cell.withLength(L), w) }, start, options.periodTolerance);

  // Far above the cold-start range a cold start mostly diverges after many iterations: go up in χN from below at once.
  if (req.system.chiN > 2 * COLD_START_CHIN && !req.initial) return continued(new Error(`χN = ${req.system.chiN} is above the range where a cold start is trusted (${2 * COLD_START_CHIN})`));
  let first: ScftSolution;
  try {
    first = solveAt(guess * p, req.initial);
  } catch (e) {
    if (!(e instanceof StressSearchFailure) || req.system.chiN <= COLD_START_CHIN) throw asRunFailure(e, req.system.chiN);
    return continued(e);
  }
  if (first.phase === 'disordered') {
    // Probe around the guess: if every trial collapses, the melt is disordered here and F(L) is flat.
    for (const L of [guess * 1.05, guess / 1.05]) {
      const s = solveAt(L * p, undefined);
      if (s.phase === 'lamellar') {
        return settle(() => search({ length: L * p, initial: s.w }), []);
      }
    }
    first.notes.push(`disordered at every trial period (${[guess, guess * 1.05, guess / 1.05].map((v) => v.toFixed(3)).join(', ')} Rg): no equilibrium lamellar period at these parameters`);
    return finish(first, Number.NaN, Number.NaN, []);
  }
  try {
    const r = search({ length: guess * p, initial: first.w });
    return finish(r.solution, r.length / p, r.lastStep / p, []);
  } catch (e) {
    if (!(e instanceof StressSearchFailure) || req.system.chiN <= COLD_START_CHIN) throw asRunFailure(e, req.system.chiN);
    return continued(e);
  }

  function settle(run: () => ReturnType<typeof findStressFree>, continuation: PeriodSearchResult['continuation']): PeriodSearchResult {
    try {
      const r = run();
      return finish(r.solution, r.length / p, r.lastStep / p, continuation);
    } catch (e) {
      throw asRunFailure(e, req.system.chiN);
    }
  }

  /** Continuation in χN (continuation.ts): the equilibrium where a cold start converges, carried up to this χN. */
  function continued(cause: Error): PeriodSearchResult {
    const from = Math.max(COLD_START_CHIN, 1.5 * spinodal(chain).chiN);
    if (!(from < req.system.chiN)) throw asRunFailure(cause, req.system.chiN);
    const below = findEquilibriumPeriod({ ...req, contour: contourWithTotal(chain, Math.max(100, Math.round((contour.ns * from) / req.system.chiN))), system: { ...req.system, chiN: from }, guess: undefined, initial: undefined, keepPropagators: false, onEvaluation: undefined });
    totalIterations += below.totalIterations;
    if (below.solution.phase !== 'lamellar') throw asRunFailure(cause, req.system.chiN);
    let carried;
    try {
      carried = continueInChiN(
        {
          solveAt: (chiN, length, initial) => {
            // A stage below the target needs fewer contour steps (the step error grows with χN·h): scale them down.
            const stage = chiN < req.system.chiN ? contourWithTotal(chain, Math.max(100, Math.round((contour.ns * chiN) / req.system.chiN))) : contour;
            const sol = solveFixedCell({ ...req, options, contour: stage, system: { ...req.system, chiN }, cell: req.cell.withLength(length), initial, keepPropagators: false });
            totalIterations += sol.iterations;
            return sol;
          },
          lengthAt: (chiN, last) => last.length * Math.pow(chiN / last.chiN, 1 / 5),
        },
        { chiN: from, length: below.period * p, solution: below.solution },
        req.system.chiN,
      );
    } catch (e) {
      if (e instanceof ContinuationFailure) throw new RunFailure(`equilibrium period at χN = ${req.system.chiN}: ${cause.message}; continuation from χN = ${from}: ${e.message}`);
      throw e;
    }
    const stages = [{ chiN: from, period: below.period }, ...carried.stages.slice(0, -1).map((st) => ({ chiN: st.chiN, period: st.length / p }))];
    const r = settle(() => search({ length: carried.length, initial: carried.solution.w }), stages);
    r.solution.notes.push(`reached by continuation in χN from the equilibrium at χN = ${from} (${stages.length} stage(s): ${stages.map((st) => st.chiN.toPrecision(4)).join(', ')}): ${cause.message}`);
    return r;
  }
}

function asRunFailure(e: unknown, chiN: number): unknown {
  if (e instanceof StressSearchFailure) return new RunFailure(`equilibrium period at χN = ${chiN}: ${e.message}`);
  return e;
}

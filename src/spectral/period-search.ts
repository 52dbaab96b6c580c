/**
 * The equilibrium (stress-free) lamellar period: minimise F(L) at fixed f and χN.
 *
 * Each evaluation is a full SCFT solve warm-started from the nearest ordered solution
 * found so far (fields carried over on the fractional coordinate x/L). An evaluation that
 * collapses to the disordered state is scored with its own F (= F_disordered) but never
 * becomes a warm start, so one collapse cannot pull every later evaluation down with it.
 */
import { brentMinimize, bracketMinimum } from '../numerics/brent-minimize.js';
import { buildChain } from '../physics/chain.js';
import type { SpeciesArrays } from '../physics/fields.js';
import type { ScftSolution } from '../physics/result.js';
import { spinodal } from '../physics/rpa.js';
import type { FixedCellRequest } from './scft-solver.js';
import { defaultSpectralOptions, solveFixedCell } from './scft-solver.js';

export interface PeriodSearchResult {
  solution: ScftSolution;
  /** Equilibrium period (Rg) and the bracket half-width reached on it. */
  period: number;
  periodTolerance: number;
  evaluations: number;
  totalIterations: number;
  seconds: number;
  /** Every (period, F, phase) evaluated, in order: lets a report draw F(L). */
  trace: { period: number; freeEnergy: number; phase: string; iterations: number }[];
}

export interface PeriodSearchRequest extends Omit<FixedCellRequest, 'length'> {
  /** Initial period guess in Rg; default from the RPA period scaled towards strong segregation. */
  guess?: number;
  onEvaluation?: (e: { period: number; freeEnergy: number; phase: string; evaluations: number }) => void;
}

/**
 * Starting guess: 2π/q* at the spinodal, stretched by (χN/χN_s)^{1/6} — the strong-
 * segregation exponent of Semenov's theory — above it (a guess only; the search brackets).
 */
export function periodGuess(req: Pick<PeriodSearchRequest, 'system'>): number {
  const chain = buildChain(req.system.chain);
  const sp = spinodal(chain);
  const ratio = Math.max(1, req.system.chiN / sp.chiN);
  return sp.period * Math.pow(ratio, 1 / 6);
}

export function optimizePeriod(req: PeriodSearchRequest): PeriodSearchResult {
  const t0 = performance.now();
  const options = defaultSpectralOptions(req.options);
  const guess = req.guess ?? periodGuess(req);
  const trace: PeriodSearchResult['trace'] = [];
  const solved = new Map<number, ScftSolution>();
  let warm: SpeciesArrays | undefined = req.initial;
  let totalIterations = 0;

  const evaluate = (period: number): number => {
    const cached = solved.get(period);
    if (cached) return cached.freeEnergy;
    // Propagators are kept only by the final solve below, not by every trial.
    const sol = solveFixedCell({ ...req, options, length: period * req.periods, initial: warm, keepPropagators: false });
    totalIterations += sol.iterations;
    if (!sol.converged) throw new Error(`period search: solve at period ${period.toFixed(5)} Rg did not converge (${sol.notes.join('; ')})`);
    solved.set(period, sol);
    trace.push({ period, freeEnergy: sol.freeEnergy, phase: sol.phase, iterations: sol.iterations });
    // The latest ordered solution warm-starts the next trial (the trials close in on the minimum).
    if (sol.phase === 'lamellar') warm = sol.w;
    req.onEvaluation?.({ period, freeEnergy: sol.freeEnergy, phase: sol.phase, evaluations: trace.length });
    return sol.freeEnergy;
  };

  // Probe three periods first: if all collapse, the melt is disordered here and F(L) is
  // flat, so there is no period to find (and bracketing a flat function would not end).
  const probes = [guess, guess * 1.05, guess / 1.05];
  for (const p of probes) evaluate(p);
  if (trace.every((t) => t.phase === 'disordered')) {
    const probe = solved.get(guess)!;
    const sol = req.keepPropagators ? solveFixedCell({ ...req, options, length: guess * req.periods, initial: probe.w }) : probe;
    sol.notes.push(`disordered at every trial period (${probes.map((p) => p.toFixed(3)).join(', ')} Rg): no equilibrium lamellar period at these parameters`);
    return { solution: sol, period: Number.NaN, periodTolerance: Number.NaN, evaluations: trace.length, totalIterations, seconds: (performance.now() - t0) / 1000, trace };
  }
  const lower = 0.2 * guess;
  const upper = 5 * guess;
  const br = bracketMinimum(evaluate, guess, guess * 1.05, lower, upper);
  const best = brentMinimize(evaluate, br, options.periodTolerance);
  const solution = solved.get(best.x) ?? solveFixedCell({ ...req, options, length: best.x * req.periods, initial: warm, keepPropagators: false });
  // Re-solving from the converged fields costs one iteration and stores the propagators.
  const final = req.keepPropagators ? solveFixedCell({ ...req, options, length: best.x * req.periods, initial: solution.w }) : solution;
  return {
    solution: final,
    period: best.x,
    periodTolerance: best.tolerance,
    evaluations: trace.length,
    totalIterations,
    seconds: (performance.now() - t0) / 1000,
    trace,
  };
}

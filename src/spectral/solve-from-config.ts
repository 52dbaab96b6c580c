/**
 * A reference solve as the config describes it: fixed period, or the equilibrium period.
 * The CLI and the other tools (trainer, inverse, reports) all come through here.
 */
import { buildChain } from '../physics/chain.js';
import type { SpeciesArrays } from '../physics/fields.js';
import type { ScftSolution } from '../physics/result.js';
import { InputError } from '../io/errors.js';
import type { SolveConfig } from '../io/schemas/solve-config.js';
import type { PeriodSearchResult } from './period-search.js';
import { optimizePeriod } from './period-search.js';
import { solveFixedCell } from './scft-solver.js';

export interface ReferenceSolve {
  solution: ScftSolution;
  search?: PeriodSearchResult;
}

export interface SolveHooks {
  initial?: SpeciesArrays;
  onEvaluation?: (e: { period: number; freeEnergy: number; phase: string; evaluations: number }) => void;
}

export function solveFromConfig(config: Pick<SolveConfig, 'system' | 'cell' | 'solver' | 'output'>, hooks: SolveHooks = {}): ReferenceSolve {
  const chain = buildChain(config.system.chain);
  const { cell } = config;
  const base = {
    system: config.system,
    periods: cell.periods,
    nx: cell.nx,
    ns: cell.ns,
    options: config.solver,
    initial: hooks.initial,
    keepPropagators: config.output.propagators,
  };
  if (cell.period === 'optimize') {
    if (chain.species.length < 2) {
      throw new InputError(`cell.period: got "optimize"; a period search needs a chain with both A and B blocks (${chain.label} has one species): give a number`);
    }
    if (config.system.externalField) {
      throw new InputError('cell.period: got "optimize"; a chain in prescribed external fields has no equilibrium period: give a number');
    }
    const search = optimizePeriod({ ...base, onEvaluation: hooks.onEvaluation });
    return { solution: search.solution, search };
  }
  return { solution: solveFixedCell({ ...base, length: cell.period * cell.periods }) };
}

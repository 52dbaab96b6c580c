/**
 * A reference solve as the config describes it: a fixed cell, or the equilibrium period, on
 * the grid and contour the config gives or (for "auto") on the resolution chosen from the
 * physics and then checked by the solver's own error estimates (resolution.ts). The CLI and
 * the other tools (trainer, inverse, sweeps, surrogates, reports) all come through here.
 */
import { buildChain } from '../physics/chain.js';
import type { Chain } from '../physics/chain.js';
import { PeriodicCell } from '../physics/cell/periodic-cell.js';
import { contourWithTotal } from '../physics/contour.js';
import type { SpeciesArrays } from '../physics/fields.js';
import type { ScftSolution } from '../physics/result.js';
import { InputError } from '../io/errors.js';
import type { SolveConfig } from '../io/schemas/solve-config.js';
import type { PeriodSearchResult } from './period-search.js';
import { findEquilibriumPeriod, periodGuess } from './period-search.js';
import { defaultContourSteps, defaultGridPoints, RESOLUTION_TARGET, resolutionError } from './resolution.js';
import type { ResolutionError } from './resolution.js';
import type { FixedCellRequest } from './scft-solver.js';
import { solveFixedCell } from './scft-solver.js';
import { FilmCell } from '../physics/cell/film-cell.js';
import type { FilmCellSpec } from '../io/schemas/spectral-schema.js';
import { solveFilm } from './film-solve.js';
import type { FilmSolve } from './film-solve.js';
import { defaultFilmPoints } from './resolution.js';

/** What resolution a solve used, how it was chosen, and the solver's estimate of what it costs. */
export interface ResolutionReport {
  nx: number;
  ns: number;
  /** Contour steps on each block. */
  stepsPerBlock: number[];
  chosen: { nx: 'given' | 'auto'; ns: 'given' | 'auto' };
  /** The error estimates of the final solution (resolution.ts). */
  error: ResolutionError;
  /** The accuracy "auto" is held to. */
  target: typeof RESOLUTION_TARGET;
  /** Refinements made after the first solve (auto only). */
  refinements: string[];
}

export interface ReferenceSolve {
  solution: ScftSolution;
  search?: PeriodSearchResult;
  /** A film's disordered reference, layers and free energy per area (film-solve.ts). */
  film?: Omit<FilmSolve, 'solution'>;
  resolution: ResolutionReport;
}

export interface SolveHooks {
  initial?: SpeciesArrays;
  onEvaluation?: (e: { period: number; freeEnergy: number; phase: string; evaluations: number }) => void;
}

/** At most this many doublings of nx or ns after the first solve. */
const MAX_REFINEMENTS = 3;

export function solveFromConfig(config: Pick<SolveConfig, 'system' | 'cell' | 'solver' | 'output'>, hooks: SolveHooks = {}): ReferenceSolve {
  const chain = buildChain(config.system.chain);
  const { cell } = config;
  if (cell.kind === 'film') return solveFilmFromConfig(config, { ...cell }, chain, hooks);
  const optimize = cell.period === 'optimize';
  if (optimize) {
    if (chain.species.length < 2) {
      throw new InputError(`cell.period: got "optimize"; a period search needs a chain with both A and B blocks (${chain.label} has one species): give a number`);
    }
    if (config.system.externalField) {
      throw new InputError('cell.period: got "optimize"; a chain in prescribed external fields has no equilibrium period: give a number');
    }
  }
  const chiN = config.system.chiN;
  const length = (cell.period === 'optimize' ? periodGuess(config.system, chain) : cell.period) * cell.periods;
  let nx = cell.nx === 'auto' ? defaultGridPoints(chain, chiN, length) : cell.nx;
  let ns = cell.ns === 'auto' ? defaultContourSteps(chain, chiN) : cell.ns;
  const refinements: string[] = [];
  let initial = hooks.initial;
  let guess: number | undefined;
  for (let round = 0; ; round++) {
    const contour = contourWithTotal(chain, ns, 'cell.ns');
    const base = { system: config.system, contour, options: config.solver, initial, keepPropagators: config.output.propagators };
    let solution: ScftSolution;
    let search: PeriodSearchResult | undefined;
    if (optimize) {
      search = findEquilibriumPeriod({ ...base, cell: new PeriodicCell(1, nx, cell.periods), guess, onEvaluation: hooks.onEvaluation });
      solution = search.solution;
    } else {
      solution = solveFittingPeriods({ ...base, cell: new PeriodicCell(length, nx, cell.periods) }, chain);
    }
    const error = resolutionError(chain, solution.cell, solution.contour, solution.w);
    const report = (): ResolutionReport => ({
      nx,
      ns: contour.ns,
      stepsPerBlock: contour.blocks.map((b) => b.steps),
      chosen: { nx: cell.nx === 'auto' ? 'auto' : 'given', ns: cell.ns === 'auto' ? 'auto' : 'given' },
      error,
      target: RESOLUTION_TARGET,
      refinements,
    });
    if (!solution.converged || round >= MAX_REFINEMENTS) return { solution, search, resolution: report() };
    const refineNs = cell.ns === 'auto' && (error.contour.phi > RESOLUTION_TARGET.phi || error.contour.lnQ > RESOLUTION_TARGET.lnQ);
    const refineNx = cell.nx === 'auto' && (error.grid.phi > RESOLUTION_TARGET.phi || error.grid.lnQ > RESOLUTION_TARGET.lnQ);
    if (!refineNs && !refineNx) return { solution, search, resolution: report() };
    if (refineNs) {
      refinements.push(`ns ${contour.ns} → ${2 * contour.ns} (contour error estimate: φA ${error.contour.phi.toExponential(1)}, ln Q ${error.contour.lnQ.toExponential(1)})`);
      ns = 2 * contour.ns;
    }
    if (refineNx) {
      refinements.push(`nx ${nx} → ${2 * nx} (grid error estimate: φA ${error.grid.phi.toExponential(1)}, ln Q ${error.grid.lnQ.toExponential(1)})`);
      nx *= 2;
    }
    // The refined solve starts from the fields just found (resampled onto the new grid by the solver).
    initial = solution.w;
    if (optimize && Number.isFinite(solution.period)) guess = solution.period;
  }
}

/**
 * A fixed periodic cell, started with the number of periods that fits it as well as with the
 * number asked for: a cell of twice the equilibrium period started with one period holds a
 * lamella stretched so far that the iteration collapses to disorder, while the same cell holds
 * two relaxed periods (seen: χN = 15, L = 7.4 Rg, one period: disordered, F = 3.75; two: the
 * lamella, F = 3.4293). The lower free energy wins; the note says which start it came from.
 */
export function solveFittingPeriods(req: FixedCellRequest & { cell: PeriodicCell }, chain: Chain): ScftSolution {
  const asked = solveFixedCell(req);
  if (req.initial || chain.species.length < 2 || req.system.externalField) return asked;
  const fits = Math.max(1, Math.round(req.cell.length / periodGuess(req.system, chain)));
  if (fits === req.cell.periods) return asked;
  const alt = solveFixedCell({ ...req, cell: req.cell.withPeriods(fits) });
  const better = alt.converged && alt.phase === 'lamellar' && (!asked.converged || asked.phase !== 'lamellar' || alt.freeEnergy < asked.freeEnergy - 1e-12);
  if (!better) return asked;
  alt.notes.unshift(
    `the cell of ${req.cell.length.toPrecision(6)} Rg holds ${fits} periods of ${(req.cell.length / fits).toPrecision(6)} Rg: started with ${fits}, the lamella has F = ${alt.freeEnergy.toPrecision(10)} kT/chain against ${asked.phase === 'lamellar' && asked.converged ? `${asked.freeEnergy.toPrecision(10)} with ${req.cell.periods}` : `the ${asked.converged ? asked.phase : 'unconverged'} result of a ${req.cell.periods}-period start`}`,
  );
  return alt;
}

/** A film as the config describes it, with the same automatic resolution as a periodic cell. */
function solveFilmFromConfig(config: Pick<SolveConfig, 'system' | 'solver' | 'output'>, cell: FilmCellSpec, chain: Chain, hooks: SolveHooks): ReferenceSolve {
  const chiN = config.system.chiN;
  let nx = cell.nx === 'auto' ? defaultFilmPoints(chain, chiN, cell.thickness, cell.walls.range) : cell.nx;
  let ns = cell.ns === 'auto' ? defaultContourSteps(chain, chiN) : cell.ns;
  const refinements: string[] = [];
  let initial = hooks.initial;
  for (let round = 0; ; round++) {
    const contour = contourWithTotal(chain, ns, 'cell.ns');
    const film = solveFilm({ system: config.system, cell: new FilmCell(cell.thickness, nx, cell.walls), contour, options: config.solver, initial, keepPropagators: config.output.propagators });
    const { solution, ...rest } = film;
    const error = resolutionError(chain, solution.cell, solution.contour, solution.w);
    const done: ReferenceSolve = {
      solution,
      film: rest,
      resolution: { nx, ns: contour.ns, stepsPerBlock: contour.blocks.map((b) => b.steps), chosen: { nx: cell.nx === 'auto' ? 'auto' : 'given', ns: cell.ns === 'auto' ? 'auto' : 'given' }, error, target: RESOLUTION_TARGET, refinements },
    };
    if (!solution.converged || round >= MAX_REFINEMENTS) return done;
    const refineNs = cell.ns === 'auto' && (error.contour.phi > RESOLUTION_TARGET.phi || error.contour.lnQ > RESOLUTION_TARGET.lnQ);
    const refineNx = cell.nx === 'auto' && (error.grid.phi > RESOLUTION_TARGET.phi || error.grid.lnQ > RESOLUTION_TARGET.lnQ);
    if (!refineNs && !refineNx) return done;
    if (refineNs) {
      refinements.push(`ns ${contour.ns} → ${2 * contour.ns} (contour error estimate: φA ${error.contour.phi.toExponential(1)}, ln Q ${error.contour.lnQ.toExponential(1)})`);
      ns = 2 * contour.ns;
    }
    if (refineNx) {
      refinements.push(`nx ${nx} → ${2 * nx} (grid error estimate: φA ${error.grid.phi.toExponential(1)}, ln Q ${error.grid.lnQ.toExponential(1)})`);
      nx *= 2;
    }
    initial = solution.w;
  }
}

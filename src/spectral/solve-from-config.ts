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
import type { Contour } from '../physics/contour.js';
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
  onEvaluation?: (e: { period: number; freeEnergy: number; phase: string; evaluations: number; residual: number }) => void;
}

/** At most this many doublings of nx or ns after the first solve. */
const MAX_REFINEMENTS = 3;

/** One solve at a given resolution, warm-started from `initial` (the fields of the previous round). */
type ResolvedSolve = (nx: number, contour: Contour, initial: SpeciesArrays | undefined) => Omit<ReferenceSolve, 'resolution'>;

/**
 * The refinement loop of "auto" (resolution.ts): solve at the chosen nx and ns, measure the
 * solver's own error estimates, and refine whichever is "auto" and above its target (ns to the
 * count the fourth-order estimate asks for, nx doubled), up to MAX_REFINEMENTS times, each round
 * warm-started from the last.
 */
function solveResolved(chain: Chain, spec: { nx: number | 'auto'; ns: number | 'auto' }, first: { nx: number; ns: number }, initial: SpeciesArrays | undefined, solveAt: ResolvedSolve): ReferenceSolve {
  let { nx, ns } = first;
  const refinements: string[] = [];
  for (let round = 0; ; round++) {
    const contour = contourWithTotal(chain, ns, 'cell.ns');
    const out = solveAt(nx, contour, initial);
    const solution = out.solution;
    const error = resolutionError(chain, solution.cell, solution.contour, solution.w);
    const done: ReferenceSolve = {
      ...out,
      resolution: { nx, ns: contour.ns, stepsPerBlock: contour.blocks.map((b) => b.steps), chosen: { nx: spec.nx === 'auto' ? 'auto' : 'given', ns: spec.ns === 'auto' ? 'auto' : 'given' }, error, target: RESOLUTION_TARGET, refinements },
    };
    if (!solution.converged || round >= MAX_REFINEMENTS) return done;
    const refineNs = spec.ns === 'auto' && (error.contour.phi > RESOLUTION_TARGET.phi || error.contour.lnQ > RESOLUTION_TARGET.lnQ);
    const refineNx = spec.nx === 'auto' && (error.grid.phi > RESOLUTION_TARGET.phi || error.grid.lnQ > RESOLUTION_TARGET.lnQ);
    if (!refineNs && !refineNx) return done;
    if (refineNs) {
      // The error falls as h⁴: jump to the steps the estimate asks for (15 % margin), at least ×1.25.
      const excess = Math.max(error.contour.phi / RESOLUTION_TARGET.phi, error.contour.lnQ / RESOLUTION_TARGET.lnQ);
      const next = 2 * Math.ceil((contour.ns * Math.min(4, Math.max(1.25, 1.15 * Math.pow(excess, 1 / 4)))) / 2);
      refinements.push(`ns ${contour.ns} → ${next} (contour error estimate: φA ${error.contour.phi.toExponential(1)}, ln Q ${error.contour.lnQ.toExponential(1)})`);
      ns = next;
    }
    if (refineNx) {
      refinements.push(`nx ${nx} → ${2 * nx} (grid error estimate: φA ${error.grid.phi.toExponential(1)}, ln Q ${error.grid.lnQ.toExponential(1)})`);
      nx *= 2;
    }
    // The refined solve starts from the fields just found (resampled onto the new grid by the solver).
    initial = solution.w;
  }
}

export function solveFromConfig(config: Pick<SolveConfig, 'system' | 'cell' | 'solver' | 'output'>, hooks: SolveHooks = {}): ReferenceSolve {
  const chain = buildChain(config.system.chain);
  const { cell } = config;
  const chiN = config.system.chiN;
  const ns = cell.ns === 'auto' ? defaultContourSteps(chain, chiN) : cell.ns;
  const common = { system: config.system, options: config.solver, keepPropagators: config.output.propagators };
  if (cell.kind === 'film') {
    const nx = cell.nx === 'auto' ? defaultFilmPoints(chain, chiN, cell.thickness, cell.walls.range) : cell.nx;
    return solveResolved(chain, cell, { nx, ns }, hooks.initial, (n, contour, initial) => {
      const { solution, ...film } = solveFilm({ ...common, cell: new FilmCell(cell.thickness, n, cell.walls), contour, initial });
      return { solution, film };
    });
  }
  const searchPeriod = cell.period === 'equilibrium';
  if (searchPeriod) {
    if (chain.species.length < 2) {
      throw new InputError(`cell.period: got "equilibrium"; a period search needs a chain with both A and B blocks (${chain.label} has one species): give a number`);
    }
    if (config.system.externalField) {
      throw new InputError('cell.period: got "equilibrium"; a chain in prescribed external fields has no equilibrium period: give a number');
    }
  }
  const length = (cell.period === 'equilibrium' ? periodGuess(config.system, chain) : cell.period) * cell.periods;
  const nx = cell.nx === 'auto' ? defaultGridPoints(chain, chiN, length) : cell.nx;
  let guess: number | undefined;
  return solveResolved(chain, cell, { nx, ns }, hooks.initial, (n, contour, initial) => {
    if (!searchPeriod) return { solution: solveFittingPeriods({ ...common, contour, initial, cell: new PeriodicCell(length, n, cell.periods) }, chain) };
    const search = findEquilibriumPeriod({ ...common, contour, initial, cell: new PeriodicCell(1, n, cell.periods), guess, onEvaluation: hooks.onEvaluation });
    if (Number.isFinite(search.period)) guess = search.period;
    return { solution: search.solution, search };
  });
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

/**
 * The network estimator of χN, in two strategies, run per seed and summarised here. The
 * default, 'least-squares', makes χN a parameter of one least-squares problem with the
 * networks' SCFT residuals and the data rows (network-joint-fit.ts, network-least-squares.ts),
 * the data rows split along the classical fit's directions (fit-directions.ts, dataSplit
 * below). The other, 'adam-lbfgs', runs the physics-informed trainer as a data-driven SCFT
 * iteration (network-adam-lbfgs.ts).
 *
 * Frame: data coordinate x ↦ model cell t = x − x0 (mod L), with the offset x0 and period L of
 * the classical estimate. Start: the networks are fitted to the spectral solution at a starting
 * χN (the classical estimate, or a given guess). Uncertainty: several seeds give a spread; it
 * measures how far independent trainings land apart, not the statistical error of the data.
 */
import { portable } from '../physics/cell/make-cell.js';
import type { Portable } from '../physics/cell/make-cell.js';
import type { ScftSolution } from '../physics/result.js';
import { solveFixedCell } from '../spectral/scft-solver.js';
import { selectBackend } from '../autodiff/backend.js';
import type { BackendKind } from '../autodiff/backend.js';
import type { Tf } from '../autodiff/tf.js';
import { RunStopped, stopAbortSignal, stopRequested } from '../runtime/stop.js';
import { PoolStopped } from '../threads/worker-pool.js';
import type { ClassicalEstimate } from './classical.js';
import { loadFloat64Passes } from '../autodiff/float64-passes.js';
import { jointFitSeed } from './network-joint-fit.js';
import { fitDirections } from './fit-directions.js';
import { adamLbfgsRuns } from './network-adam-lbfgs.js';
import type { AdamLbfgsSettings } from './network-adam-lbfgs.js';
import type { ProfileData } from './profile-csv.js';

/** The settings of both strategies (the adam-lbfgs ones in AdamLbfgsSettings: that strategy alone reads them). */
export interface NetworkEstimatorSettings extends AdamLbfgsSettings {
  /** χN the networks start from; default the classical estimate. */
  chiNStart?: number;
  backend: BackendKind;
  /**
   * 'least-squares' (default): χN as a parameter of one least-squares problem with the SCFT
   * residuals and the data rows, solved by Levenberg–Marquardt in float64 (network-joint-fit.ts);
   * it reads secondOrderIterations and dataWeight, not the Adam/L-BFGS budgets. 'adam-lbfgs': the
   * data-driven SCFT iteration of network-adam-lbfgs.ts.
   */
  strategy?: 'adam-lbfgs' | 'least-squares';
  /** Cycles of the 'least-squares' strategy with χN free (default 16; 2 with χN held come first): each one joint LM iteration, then the propagators' own (network-joint-fit.ts). */
  secondOrderIterations?: number;
  /** λ of the data rows of the 'least-squares' strategy (default 30). */
  dataWeight?: number;
  /**
   * Worker threads running seeds at once (default 1: all seeds in this thread). The seeds
   * are independent and each is deterministic, so the estimate is the same either way.
   */
  workers?: number;
}

/** What the estimator reads of the classical estimate (all a worker thread is sent). */
export type ClassicalStart = Pick<ClassicalEstimate, 'chiN' | 'period' | 'offset' | 'solution'> & Partial<Pick<ClassicalEstimate, 'periodMode' | 'rmsResidual'>>;

export interface NetworkRun {
  seed: number;
  chiN: number;
  /** Least-squares strategy: the propagators' MDE mean square on the residual grid and between its points (network-joint-fit.ts). */
  aliasing?: { onGrid: number; between: number; nx: number };
  trajectory: { step: number; chiN: number }[];
  /** The period this run fitted beside χN (Rg; the least-squares strategy with a free period), absent when it kept the classical one. */
  period?: number;
  /** The data's offset this run's networks settled on (Rg; the least-squares strategy), absent when it kept the classical one. */
  offset?: number;
  rmsResidual: number;
  /** w_A − w_B of the network on the model grid (kT). */
  exchange: Float64Array;
  seconds: number;
}

export interface NetworkEstimate {
  chiN: number;
  spread: number;
  interval: [number, number];
  runs: NetworkRun[];
  chiNStart: number;
  backend: string;
  tfjs: string;
  seconds: number;
  /** Model grid (Rg, cell frame) of `exchange`. */
  x: Float64Array;
  /** How the least-squares strategy's data rows were built (dataSplit), absent for adam-lbfgs. */
  dataRows?: string;
  /** What the network χN rests on beyond the model: the classical fit's inputs it starts from and reads the data along (the report's title page). */
  restsOn: string[];
  notes: string[];
}

/**
 * Networks, grid, start fits and cycles of the 'least-squares' strategy (network sizes of the
 * second-order train recipe, docs/second-order-training.md; the rest as measured in
 * docs/inverse.md). The residual grid has 64 x points: on 32 the networks fitted the MDE at the
 * points and not between them (mean square 5.8e-4 there, 7.9e-2 on 4 × as many; on 64 points
 * 5.0e-4 on both). 12 contour steps per block, 40 start iterations of each propagator's MDE,
 * then 2 cycles with χN held and LEAST_SQUARES_CYCLES (16, the default of
 * secondOrderIterations) with it free, each one joint LM iteration and 4 of each propagator on
 * its own MDE
 * (network-joint-fit.ts). The 40 start iterations (10 before) shrink the fall of χN when it is
 * freed, which the cycles then climb back (docs/inverse.md, "The data rows along the fit's
 * directions"); they cost about as much as the 4 cycles dropped. On the noiseless bench case,
 * started 10 % low, network seeds 1–5 ended within 6e-4 of the true χN in about 13 s each here.
 */
const LEAST_SQUARES_RECIPE = { fieldHidden: [16], propagatorHidden: [12, 12], nx: 64, nodesPerBlock: 12, fieldStartIterations: 20, propagatorStartIterations: 6, mdeStartIterations: 40, tau: 1e-7, holdChiNIterations: 2, propagatorIterations: 4 };
/** Default cycles with χN free (network.secondOrderIterations). */
const LEAST_SQUARES_CYCLES = 16;

/**
 * φ_A accuracy of the least-squares recipe's networks (RMS over the data points, φ units): the
 * scale below which the networks' own profile is no better than the data's. Measured on the
 * noiseless bench case started at the classical estimate, with the data rows reduced to the
 * fit's directions (shape weight 0): RMS of network φ_A − data 4.5e-4 (seed 1) and 2.9e-3
 * (seed 4) after the recipe's cycles (docs/inverse.md, "The data rows along the fit's directions").
 */
const NETWORK_PROFILE_ACCURACY = 1e-3;

/**
 * The least-squares strategy's data rows, split along the classical fit's directions (offset,
 * χN, and the period when free: inverse/fit-directions.ts). The part of the data in their span
 * is what moves the estimate; the rest is the profile's shape beyond them, which the data know
 * to their noise σ and the networks' physics to about NETWORK_PROFILE_ACCURACY (a): it is
 * weighted a² / (a² + σ²), the share the data would add to the networks' own (inverse-variance
 * weighting). Noiseless data keep every point row (weight ≈ 1): the shape from the data pins the
 * networks, which settle faster; noisy data leave the shape to the physics, so the networks do
 * not bend towards the noise (measured: docs/inverse.md). σ is the sigma column's RMS, or the
 * classical fit's RMS residual without one.
 */
function dataSplit(data: ProfileData, classical: ClassicalStart, s: NetworkEstimatorSettings): { directions: Float64Array[]; shapeWeight: number; note: string } {
  const sol = classical.solution;
  const periodMode = classical.periodMode ?? 'given';
  const { names, columns } = fitDirections(data.x, { chiN: classical.chiN, period: classical.period, offset: classical.offset, periodMode, nx: sol.nx, ns: sol.ns }, s.chain, s.resolution);
  const sigma = data.sigma ? Math.sqrt(data.sigma.reduce((a, v) => a + v * v, 0) / data.sigma.length) : (classical.rmsResidual ?? 0);
  const a2 = NETWORK_PROFILE_ACCURACY ** 2;
  const shapeWeight = a2 / (a2 + sigma * sigma);
  const described = names.map((n) => (n === 'chiN' ? (periodMode === 'equilibrium' ? 'χN along the stress-free period' : 'χN at the held period') : n));
  const note = `data rows along the classical fit's directions at its estimate (${described.join(', ')}); the profile's shape beyond them weighted ${shapeWeight.toPrecision(2)} = a²/(a² + σ²), with the data's noise σ = ${sigma.toPrecision(2)} (${data.sigma ? 'the sigma column' : "the classical fit's RMS residual"}) against the networks' accuracy a = ${NETWORK_PROFILE_ACCURACY} (docs/inverse.md)`;
  return { directions: columns, shapeWeight, note };
}

function modelFrame(data: ProfileData, est: ClassicalStart): Float64Array {
  const L = est.period;
  return Float64Array.from(data.x, (x) => {
    const t = (x - est.offset) % L;
    return t < 0 ? t + L : t;
  });
}

/** What a seed worker (seed-worker.ts) is sent once (no functions: they do not cross threads). */
export interface SeedWorkerData {
  data: ProfileData;
  /** The classical start with its solution's cell as a plain description (a Cell holds functions, which do not cross to a worker). */
  classical: Omit<ClassicalStart, 'solution'> & { solution: Portable<ClassicalStart['solution']> };
  settings: Omit<NetworkEstimatorSettings, 'onProgress' | 'seeds' | 'workers'>;
}

/** A seed's progress as it crosses the thread boundary: the arguments of onProgress. */
export type SeedProgress = Parameters<NonNullable<NetworkEstimatorSettings['onProgress']>>;

/**
 * The seeds on worker threads, each with its own tfjs instance (threads/worker-pool.ts): the
 * seeds are independent trainings, and two at once use both cores of a small machine
 * (measured for two like-for-like runs: ×1.48 the throughput of one, npm run bench --
 * --step-profile). One estimate per seed, in the order of `seeds`.
 */
async function estimateInSeedWorkers(data: ProfileData, classical: ClassicalStart, s: NetworkEstimatorSettings): Promise<NetworkEstimate[]> {
  const { runInWorkers } = await import('../threads/worker-pool.js');
  const { onProgress, seeds, workers, ...settings } = s;
  const workerData: SeedWorkerData = {
    data,
    classical: { chiN: classical.chiN, period: classical.period, offset: classical.offset, ...(classical.periodMode ? { periodMode: classical.periodMode } : {}), ...(classical.rmsResidual !== undefined ? { rmsResidual: classical.rmsResidual } : {}), solution: portable(classical.solution) },
    settings,
  };
  try {
    return await runInWorkers<number, NetworkEstimate, SeedProgress>(seeds, { entry: 'inverse/seed-worker.js', workerData, workers: workers ?? 1, onProgress: (p) => onProgress?.(...p), signal: stopAbortSignal() });
  } catch (e) {
    // Ctrl-C/SIGTERM: the workers are terminated; the seeds' work is not kept (an inversion has no checkpoint).
    if (e instanceof PoolStopped) throw new RunStopped('network estimator stopped by a signal (its worker threads were ended); no network result was written');
    throw e;
  }
}

export async function estimateNetwork(data: ProfileData, classical: ClassicalStart, settings: NetworkEstimatorSettings): Promise<NetworkEstimate> {
  const t0 = performance.now();
  const s = { ...settings, strategy: settings.strategy ?? 'least-squares' };
  if ((s.workers ?? 1) > 1 && s.seeds.length > 1) {
    const one = await estimateInSeedWorkers(data, classical, s);
    const runs = one.flatMap((e) => e.runs).sort((a, b) => a.seed - b.seed);
    return summarise(runs, one[0], t0, s.strategy);
  }
  const handle = await selectBackend(s.backend);
  // The least-squares strategy's normal matrices, factorisations and jet passes in the f64x2
  // kernels (the JS forms' results to the last bit).
  if (s.strategy === 'least-squares') await loadFloat64Passes();
  const chiNStart = s.chiNStart ?? classical.chiN;
  // Starting fields: the spectral solution at the starting χN in the classical cell.
  const cell = classical.solution.cell.withLength(classical.period);
  const start = solveFixedCell({ system: { chain: s.chain, chiN: chiNStart }, cell, contour: classical.solution.contour, initial: classical.solution.w, keepPropagators: true });
  if (!start.propagators) throw new Error('network estimator: the start solve kept no propagators');
  const t = modelFrame(data, classical);
  const common = { chiNStart, backend: handle.backend, tfjs: handle.tfjsVersion, x: start.x };
  if (s.strategy === 'least-squares') {
    const { runs, dataRows } = leastSquaresRuns(handle.tf, data, classical, start, chiNStart, t, s);
    return summarise(runs, { ...common, dataRows }, t0, s.strategy);
  }
  const runs = await adamLbfgsRuns(handle.tf, data, classical, start, chiNStart, t, s);
  return summarise(runs, common, t0, s.strategy);
}

/** The least-squares strategy's seeds, one after the other (network-joint-fit.ts). */
function leastSquaresRuns(tf: Tf, data: ProfileData, classical: ClassicalStart, start: ScftSolution, chiNStart: number, t: Float64Array, s: NetworkEstimatorSettings): { runs: NetworkRun[]; dataRows: string } {
  // A free period (the classical fit's mode "free") is a parameter of the fit too, on the data's
  // unwrapped positions; the offset needs none: the networks translate freely, and the data rows
  // set their phase.
  const fitPeriod = classical.periodMode === 'free';
  const u = Float64Array.from(data.x, (x) => x - classical.offset);
  const split = dataSplit(data, classical, s);
  const cycles = s.secondOrderIterations ?? LEAST_SQUARES_CYCLES;
  const runs: NetworkRun[] = [];
  for (const seed of s.seeds) {
    const tr0 = performance.now();
    const run = jointFitSeed(tf, start, chiNStart, classical.period, { t, u, phi: data.phi, sigma: data.sigma, split }, {
      ...LEAST_SQUARES_RECIPE,
      chain: s.chain,
      seed,
      fitPeriod,
      iterations: cycles,
      dataWeight: s.dataWeight ?? 30,
      resolution: s.resolution,
      shouldStop: stopRequested,
      onIteration: (it, chiN) => s.onProgress?.(seed, it, LEAST_SQUARES_RECIPE.holdChiNIterations + cycles, chiN),
    }, start.x);
    if (run.reason === 'interrupted') throw new RunStopped(`network estimator stopped by a signal at seed ${seed}, least-squares iteration ${run.iterations}; no network result was written`);
    runs.push({ seed, chiN: run.chiN, offset: classical.offset + run.shift, ...(fitPeriod ? { period: run.period } : {}), trajectory: run.trajectory, rmsResidual: run.rmsResidual, exchange: run.exchange, seconds: (performance.now() - tr0) / 1000, aliasing: { onGrid: run.mdeOnGrid, between: run.mdeBetween, nx: LEAST_SQUARES_RECIPE.nx } });
  }
  return { runs, dataRows: split.note };
}

/** The estimate from the seeds' runs: their mean, spread and range. */
function summarise(runs: NetworkRun[], common: Pick<NetworkEstimate, 'chiNStart' | 'backend' | 'tfjs' | 'x' | 'dataRows'>, t0: number, strategy: NetworkEstimatorSettings['strategy']): NetworkEstimate {
  const values = runs.map((r) => r.chiN);
  const mean = values.reduce((a, b) => a + b, 0) / values.length;
  const spread = values.length > 1 ? Math.sqrt(values.reduce((a, b) => a + (b - mean) ** 2, 0) / (values.length - 1)) : 0;
  const periodFitted = runs.every((r) => r.period !== undefined);
  const notes = [
    `seed spread over ${values.length} run(s): it measures how far independent trainings land apart, not the statistical error of the data; read the classical profile-likelihood interval for that`,
    runs.every((r) => r.offset !== undefined)
      ? `offset${periodFitted ? ' and period' : ''} fitted with χN (started at the classical ${periodFitted ? 'ones' : 'offset, the period held at the classical one'}; the offset is where the networks put the A-rich domain, since they translate freely and the data rows set their phase); networks started from the spectral solution at χN = ${common.chiNStart.toPrecision(6)}`
      : `offset and period taken from the classical estimate; networks started from the spectral solution at χN = ${common.chiNStart.toPrecision(6)}`,
    ...runs.flatMap((r) => (r.aliasing ? [`seed ${r.seed}: the networks' MDE mean square ${r.aliasing.onGrid.toExponential(2)} on the ${r.aliasing.nx} x points of the fit, ${r.aliasing.between.toExponential(2)} on 4 × as many (${r.aliasing.between > 2 * r.aliasing.onGrid ? 'far above the first: the networks fit the MDE at the points and not between them' : 'no more than twice the first: the MDE holds between the points as on them'})`] : [])),
    ...(strategy === 'least-squares'
      ? [
          "strategy least-squares: χN fitted with the networks as one Levenberg–Marquardt problem, the SCFT residuals beside the data rows (measured with 2 % noise: 16 of 16 draws inside the classical 95 % interval, 0.007 to 0.032 below the classical estimate; docs/inverse.md); the estimate rests on the classical fit's offset, period and directions, so read the classical interval for the statistical error",
          ...(common.dataRows ? [common.dataRows] : []),
        ]
      : []),
  ];
  const restsOn =
    strategy === 'least-squares'
      ? [
          `Network χN (least-squares strategy): the networks start at the classical fit's offset and period (${periodFitted ? 'both fitted further with χN' : 'the offset fitted further with χN, the period held'}); ${common.dataRows ?? "the data rows point by point"}.`,
          "The network χN checks the classical one with the networks' own SCFT; its seed spread is an optimisation spread, not a statistical interval.",
        ]
      : ["Network χN (adam-lbfgs strategy): offset and period from the classical fit; biased low by the networks' forward error (about 0.5 % measured; docs/inverse.md); its seed spread is an optimisation spread, not a statistical interval."];
  return {
    chiN: mean,
    spread,
    interval: [Math.min(...values), Math.max(...values)],
    runs,
    chiNStart: common.chiNStart,
    backend: common.backend,
    tfjs: common.tfjs,
    seconds: (performance.now() - t0) / 1000,
    x: common.x,
    ...(common.dataRows ? { dataRows: common.dataRows } : {}),
    restsOn,
    notes,
  };
}

/**
 * One `invert` run as a library function (the CLI's `invert` is a thin layer over it; tests
 * call it directly): read the profile CSV, the classical estimate with its assumed inputs
 * profiled into the interval, the network estimator when asked, the truth comparison when a
 * synth truth sidecar sits beside the profile, and the result with the files of an output
 * directory as text. It writes no file; the caller writes `files`.
 */
import { synthTruthPath } from '../io/synth-output.js';
import { InputError, asInputError } from '../io/errors.js';
import type { InvertConfig } from '../io/schemas/invert-config.js';
import { solutionText, solutionToFile } from '../io/formats/solution.js';
import { provenance } from '../io/versions.js';
import { installStopHandlers } from '../runtime/stop.js';
import { estimateWithAssumedInputs } from './classical-with-inputs.js';
import { assumedInputs } from './assumed-inputs.js';
import type { PeriodMode } from './objective.js';
import { fitCsv, classicalBlock, inversionResult, inversionResultText, networkBlock } from './inversion-result.js';
import type { EstimatorBlock, InversionResult } from './inversion-result.js';
import { lengthUnits } from './profile-csv.js';
import { readProfile } from './invert-task.js';
import type { InvertPhaseName } from './invert-task.js';
import type { NetworkEstimate } from './network-estimator.js';
import { compareWithTruth, readTruthSidecar } from './truth-comparison.js';

export interface InvertRunOptions {
  profilePath: string;
  config: InvertConfig;
  /** Where each setting came from (a flag or a config key), for messages. */
  sources: Record<string, string>;
  /** How the config was given (its path, or "flags"): model errors name it. */
  configSource: string;
  /** Worker threads for the network estimator's seeds. */
  workers: number;
  /** The files of an output directory are wanted. */
  files: boolean;
  /** A counted unit of phase `phase` (one of invertPhases's names) finished, `done` so far; `keep`: a line that stays. */
  onStep?: (phase: InvertPhaseName, done: number, detail: string, keep?: boolean) => void;
  /** The end of an estimator, one line. */
  onEstimator?: (text: string) => void;
}

export interface InvertRunResult {
  result: InversionResult;
  /** result.json, fit.csv and solution.json, when asked for. */
  files: Record<string, string> | null;
}

/** The profile CSV, read and checked (InputError naming the file, the line and the column otherwise). */
export async function invertRun(opts: InvertRunOptions): Promise<InvertRunResult> {
  const t0 = performance.now();
  const { config, sources, profilePath } = opts;
  const step = opts.onStep ?? (() => {});
  const done = opts.onEstimator ?? (() => {});
  const units = lengthUnits(config.units ?? {});
  const data = readProfile(profilePath, config);
  const toRg = (v: number) => (units.x === 'nm' ? v / units.rgNm! : v);
  const period: PeriodMode = typeof config.cell.period === 'number' ? { mode: 'given', value: toRg(config.cell.period) } : { mode: config.cell.period };
  let evaluations = 0;
  let refits = 0;
  let estimate;
  let assumed;
  try {
    const inputs = assumedInputs(config, units, sources);
    ({ estimate, assumed } = estimateWithAssumedInputs(
      data,
      {
        chain: config.system.chain,
        nx: config.cell.nx,
        ns: config.cell.ns,
        solver: config.solver,
        period,
        chiNRange: config.chiNRange as [number, number] | undefined,
        resolution: toRg(config.resolution),
        profilePoints: config.profilePoints,
        periodSource: sources.period,
        rangeSource: sources.chiNRange,
        onEvaluation: (stage, e) => step('classical fit', ++evaluations, `${stage}: χN = ${e.chiN.toPrecision(7)}, misfit ${e.value.toPrecision(6)}, period ${e.period.toPrecision(6)} Rg (${e.phase})`),
      },
      inputs,
      (label) => step('assumed inputs', refits++, `refit with ${label}`, true),
    ));
  } catch (e) {
    throw asInputError(e, opts.configSource);
  }
  done(`χN = ${estimate.chiN.toPrecision(6)} in ${estimate.seconds.toFixed(2)} s (${estimate.cost.chiNEvaluations} χN evaluations, ${estimate.cost.solves + estimate.cost.coarseSolves} solves)`);
  const estimators: Record<string, EstimatorBlock> = {};
  let ne: NetworkEstimate | undefined;
  if (config.method !== 'network') estimators.classical = classicalBlock(estimate, data, assumed);
  if (config.method !== 'classical') {
    // The network fits χN and the fields; the phase offset and period come from the classical fit
    // (the least-squares strategy fits the offset, and a free period, further).
    const { estimateNetwork } = await import('./network-estimator.js');
    const net = config.network;
    // Seeds may train at once on worker threads: the phase's count is the sum of their steps.
    const seedSteps = new Map<number, number>();
    const uninstall = installStopHandlers('invert');
    try {
      ne = await estimateNetwork(data, estimate, {
        chain: config.system.chain,
        seeds: Array.from({ length: net.seeds }, (_, i) => i + 1),
        steps: net.adamSteps,
        warmStartSteps: net.warmStartSteps,
        fieldUpdateEvery: net.fieldUpdateEvery,
        lbfgsIterations: net.lbfgsIterations,
        lbfgsPerUpdate: net.lbfgsPerUpdate,
        strategy: net.strategy,
        secondOrderIterations: net.secondOrderIterations,
        dataWeight: net.dataWeight,
        chiNStart: net.chiNStart,
        resolution: toRg(config.resolution),
        backend: net.backend,
        workers: opts.workers,
        onProgress: (seed, at, steps, chiN) => {
          seedSteps.set(seed, at);
          step('network', [...seedSteps.values()].reduce((a, b) => a + b, 0), `seed ${seed}: step ${at}/${steps}, χN = ${chiN.toPrecision(6)}`);
        },
      });
    } finally {
      uninstall();
    }
    done(`network χN = ${ne.chiN.toPrecision(6)} ± ${ne.spread.toPrecision(2)} (seed spread of ${net.seeds}) in ${ne.seconds.toFixed(1)} s on ${ne.backend}`);
    estimators.network = networkBlock(ne, estimate, data);
  }
  // A synthetic profile (synth --out DIR) has its truth beside it: measure the estimates against it.
  const truthPath = synthTruthPath(profilePath);
  const truth = truthPath ? compareWithTruth(truthPath, readTruthSidecar(truthPath).chiN, config.system.chain, estimate, ne) : undefined;
  const result = inversionResult(data, config, provenance(), estimators, truth);
  const files = opts.files
    ? {
        // runSeconds: the wall time of the whole inversion (every estimator), for the report's title page.
        'result.json': inversionResultText({ ...result, runSeconds: (performance.now() - t0) / 1000 }),
        'fit.csv': fitCsv(data, estimate),
        'solution.json': solutionText(solutionToFile(estimate.solution, provenance(), config)),
      }
    : null;
  return { result, files };
}

/**
 * One training run from a train config: reference solve, networks, warm start (or
 * transfer, or resume), physics training, evaluation against the reference, checkpoints.
 * The CLI's `train` is a thin wrapper around trainRun; tests call it directly.
 */
import { formatText, throughSchema } from '../io/formats/file-format.js';
import { TRAIN_METRICS_VERSION, trainMetricsFileSchema, trainMetricsSchema } from '../io/formats/training.js';
import type { TrainMetrics, TransferReport } from '../io/formats/training.js';
import { InputError, RunFailure } from '../io/errors.js';
import type { TrainConfig } from '../io/schemas/train-config.js';
import { solutionText, solutionToFile, summarize } from '../io/formats/solution.js';
import { provenance } from '../io/versions.js';
import { buildChain } from '../physics/chain.js';
import type { ScftSolution } from '../physics/result.js';
import { compareSolutions } from '../physics/solution-metrics.js';
import type { SolutionMetrics } from '../physics/solution-metrics.js';
import { solveFromConfig } from '../spectral/solve-from-config.js';
import { cosineStart } from '../spectral/scft-solver.js';
import { Adam } from '../autodiff/adam.js';
import { selectBackend } from '../autodiff/backend.js';
import type { BackendHandle, Tf } from '../autodiff/backend.js';
import { loadCheckpoint, requireTransferSource, saveCheckpoint, splitWeights } from './checkpoint.js';
import type { CheckpointFile, HeldState, LoadedCheckpoint } from './checkpoint.js';
import { runSecondOrder } from './second-order-phase.js';
import type { SecondOrderProgress, SecondOrderResult } from './second-order-phase.js';
import { runVerdict } from './run-verdict.js';
import type { RunVerdict } from './run-verdict.js';
import { networkSolution } from '../network/network-solution.js';
import { buildScftNetworks } from '../network/scft-networks.js';
import type { ScftNetworks } from '../network/scft-networks.js';
import { LOSS_TERMS } from '../network/losses/terms.js';
import type { LossValues } from '../network/losses/terms.js';
import { ScftProblem } from '../network/problem/scft-problem.js';
import { yieldToEvents } from '../runtime/stop.js';
import { polishCycle, propagatorWeights, runTraining } from './train-loop.js';
import type { LoopHooks, LoopState, StopReason } from './train-loop.js';
import { warmStartYielding } from '../network/warm-start.js';
import { FieldUpdater, fieldUpdateSettings } from '../network/field-update.js';

/** Contour nodes per block for evaluating a network (finer than training: quadrature error stays negligible). */
export const EVALUATION_NODES_PER_BLOCK = 64;

export interface TrainRunOptions {
  config: TrainConfig;
  outDir?: string;
  resumeDir?: string;
  backend?: TrainConfig['backend'];
  onProgress?: LoopHooks['onProgress'];
  onStage?: (message: string) => void;
  /** Progress of the second-order phase (iteration, loss, μ, rate, time left). */
  onSecondOrder?: (p: SecondOrderProgress) => void;
  /** Each warm-start step (of `steps`) with its loss. */
  onWarmStart?: (step: number, steps: number, loss: number) => void;
  /** Each L-BFGS iteration over all cycles (of `iterations`) with its loss. */
  onLbfgs?: (iteration: number, iterations: number, loss: number) => void;
  shouldStop?: () => boolean;
  /**
   * Called once the networks are warm-started and the problem and field updater are built,
   * before the Adam steps: the recipe bench's PyTorch twin trains the networks from here
   * (src/bench/recipe-twin.ts). What it leaves in the networks is what the run goes on with.
   */
  onTrainingStart?: (ctx: TrainingStart) => Promise<void>;
}

/** What onTrainingStart gets: the warm-started networks and what the run trains them with. */
export interface TrainingStart {
  tf: Tf;
  nets: ScftNetworks;
  problem: ScftProblem;
  fieldUpdater: FieldUpdater;
  config: TrainConfig;
  reference: ScftSolution;
  /** Seconds of the warm start (0 without one). */
  warmStartSeconds: number;
  /** φ_A relative L2 of the networks against the reference, as the run's history measures it. */
  phiError: () => number;
}

export type { TrainMetrics } from '../io/formats/training.js';

export interface TrainRunResult {
  metrics: TrainMetrics;
  reference: ScftSolution;
  network: ScftSolution;
  handle: BackendHandle;
  outDir?: string;
  history: CheckpointFile['history'];
}

function sameArchitecture(a: TrainConfig, b: TrainConfig): string | null {
  const ja = JSON.stringify(a.networks);
  const jb = JSON.stringify(b.networks);
  if (ja !== jb) return `networks differ (checkpoint ${jb}, config ${ja})`;
  return null;
}

/**
 * What a transfer (initFrom) saved: Adam steps and seconds to reach targetPhiError, against
 * the same config warm-started from the reference (training.transferBaseline). The
 * baseline's seconds include its warm start (the work the transfer replaces); neither side
 * counts the reference solve, which both do alike. transfer null: it did not reach the
 * target (nothing saved to report). A baseline that did not reach it (reached false) gives
 * its whole budget, so the saving is a lower bound (saved.lowerBound).
 */
export type { TransferReport } from '../io/formats/training.js';

function checkTransferBaseline(config: TrainConfig): void {
  const tr = config.training;
  if (tr.transferBaseline === 'none') return;
  const missing = [!config.initFrom && 'initFrom', tr.targetPhiError === undefined && 'training.targetPhiError', !(tr.evaluateEvery > 0) && 'training.evaluateEvery > 0'].filter(Boolean);
  if (missing.length > 0) throw new InputError(`training.transferBaseline: got "${tr.transferBaseline}"; it needs ${missing.join(', ')} (allowed without them: "none")`);
}

/** Train the same config warm-started from the reference, up to the same target (see TransferReport). */
async function transferBaseline(opts: TrainRunOptions, config: TrainConfig): Promise<NonNullable<TransferReport['baseline']>> {
  const stage = opts.onStage ?? (() => {});
  const r = await trainRun({
    config: { ...config, initFrom: undefined, warmStart: { ...config.warmStart, type: 'reference' }, training: { ...config.training, transferBaseline: 'none' } },
    backend: opts.backend,
    onProgress: opts.onProgress,
    onStage: (m) => stage(`baseline (warm start, no transfer): ${m}`),
    shouldStop: opts.shouldStop,
  });
  const t = r.metrics.training;
  const ws = t.warmStart ?? { adamSteps: 0, seconds: 0 };
  const end = t.reachedTarget ?? { step: t.adamSteps, seconds: r.history.filter((h) => h.stage === 'adam').pop()?.seconds ?? 0 };
  return { reached: Boolean(t.reachedTarget), adamSteps: end.step, seconds: ws.seconds + end.seconds, warmStartAdamSteps: ws.adamSteps, warmStartSeconds: ws.seconds, finalPhiError: r.metrics.errors.phiA.relativeL2 };
}

function unitWeights(): LossValues {
  return Object.fromEntries(LOSS_TERMS.map((k) => [k, 1])) as LossValues;
}

export function evaluateNetworks(tf: Tf, nets: ScftNetworks, config: TrainConfig, reference: ScftSolution, keepPropagators = false): { network: ScftSolution; errors: SolutionMetrics } {
  const network = networkSolution(tf, nets, config.system, { periods: reference.periods, nx: reference.nx, nodesPerBlock: EVALUATION_NODES_PER_BLOCK, keepPropagators, propagatorS: reference.propagators?.s });
  return { network, errors: compareSolutions(network, reference) };
}

/** φ_A relative L2 against the reference (the measure of the history and the kept state): no Q correction, which it does not read. */
function phiErrorOf(tf: Tf, nets: ScftNetworks, config: TrainConfig, reference: ScftSolution): number {
  const network = networkSolution(tf, nets, config.system, { periods: reference.periods, nx: reference.nx, nodesPerBlock: EVALUATION_NODES_PER_BLOCK, correctQ: false });
  return compareSolutions(network, reference).phiA.relativeL2;
}

export async function trainRun(opts: TrainRunOptions): Promise<TrainRunResult> {
  const t0 = performance.now();
  let config = opts.config;
  checkTransferBaseline(config);
  if (config.initFrom && !opts.resumeDir) requireTransferSource(config.initFrom);
  const stage = opts.onStage ?? (() => {});
  let resumed: LoadedCheckpoint | null = null;
  if (opts.resumeDir) {
    const probe = await selectBackend(opts.backend ?? config.backend);
    resumed = loadCheckpoint(probe.tf, opts.resumeDir);
    const mismatch = sameArchitecture(config, resumed.file.config);
    if (mismatch) throw new InputError(`--resume ${opts.resumeDir}: checkpoint does not match the config: ${mismatch}`);
    if (JSON.stringify(resumed.file.config.system) !== JSON.stringify(config.system)) {
      throw new InputError(`--resume ${opts.resumeDir}: checkpoint was trained for another system (${JSON.stringify(resumed.file.config.system)}); use initFrom for transfer`);
    }
    const changed = changedSettings(resumed.file.config, config);
    if (changed.length > 0) {
      throw new InputError(
        `--resume ${opts.resumeDir}: the config differs from the one the checkpoint was trained with, and a resumed run continues that one exactly:\n${changed.map((c) => `  ${c}`).join('\n')}\nresume with the checkpoint's settings (only training.adamSteps may grow), or start a new run from it with initFrom`,
      );
    }
    // The resumed run continues the checkpoint's own schedule, with the new step budget.
    config = { ...resumed.file.config, training: { ...resumed.file.config.training, adamSteps: Math.max(config.training.adamSteps, resumed.file.step) } };
  }
  const handle = await selectBackend(opts.backend ?? config.backend);
  const tf = handle.tf;
  const chain = buildChain(config.system.chain);
  const singleChain = Boolean(config.system.externalField);

  stage('reference solve');
  // A resumed periodic run keeps the checkpoint's period (a film's thickness is in its config).
  const cell = resumed && config.cell.kind === 'periodic' ? { ...config.cell, period: resumed.file.length / resumed.file.periods } : config.cell;
  const ref = solveFromConfig({ system: config.system, cell, solver: config.solver, output: { propagators: true } });
  const reference = ref.solution;
  if (!reference.converged) throw new RunFailure(`reference: the spectral solve did not converge (${reference.notes.join('; ')})`);
  if (reference.phase === 'disordered') {
    throw new InputError(`system: the reference is disordered at χN = ${config.system.chiN} (below the order–disorder transition): there is no lamella to learn`);
  }
  const length = reference.length;
  // The networks live in the reference's cell: a periodic cell, or a film (cosine features, its walls' surface field).
  const nets = buildScftNetworks(tf, config, chain, reference.cell, !singleChain);
  const adam = new Adam(tf, nets.parameters);
  let state: LoopState = { step: 0, lossWeights: unitWeights(), history: [], bestTotal: Infinity, secondsBefore: 0 };
  const training: Partial<TrainMetrics['training']> = {};

  if (resumed) {
    const { params, adam: adamState } = splitWeights(resumed.weights);
    nets.parameters.loadNamedWeights(params);
    adam.restore(resumed.file.step, adamState);
    const last = resumed.file.history[resumed.file.history.length - 1];
    state = {
      step: resumed.file.step,
      lossWeights: resumed.file.lossWeights,
      history: resumed.file.history,
      bestTotal: resumed.file.history.filter((h) => h.stage === 'adam').reduce((m, h) => Math.min(m, h.total), Infinity),
      secondsBefore: last?.seconds ?? 0,
    };
    training.resumedFrom = { checkpoint: opts.resumeDir!, step: resumed.file.step };
    stage(`resumed from ${opts.resumeDir} at step ${resumed.file.step}`);
  } else if (config.initFrom) {
    let src: LoadedCheckpoint;
    try {
      src = loadCheckpoint(tf, config.initFrom);
    } catch (e) {
      // Name the config key, so the user knows which setting pointed there.
      if (e instanceof InputError) throw new InputError(`initFrom: ${e.message}`);
      throw e;
    }
    const mismatch = sameArchitecture(config, src.file.config);
    if (mismatch) throw new InputError(`initFrom ${config.initFrom}: cannot transfer: ${mismatch}`);
    const srcChain = buildChain(src.file.config.system.chain);
    if (srcChain.blocks.length !== chain.blocks.length) throw new InputError(`initFrom ${config.initFrom}: the checkpoint's chain has ${srcChain.blocks.length} blocks, this one ${chain.blocks.length}`);
    nets.parameters.loadNamedWeights(splitWeights(src.weights).params);
    training.transferredFrom = { checkpoint: config.initFrom, chiN: src.file.config.system.chiN, f: srcChain.speciesFraction.A };
    stage(`transfer from ${config.initFrom} (χN = ${src.file.config.system.chiN})`);
  } else if (config.warmStart.type !== 'none' && config.warmStart.adamSteps > 0) {
    const ws = config.warmStart;
    const fromReference = ws.type === 'reference';
    const w = fromReference ? reference.w : cosineStart(chain, config.system.chiN, reference.cell, 0.3);
    stage(fromReference ? 'warm start: fitting the networks to the spectral solution' : 'cold start: fitting the field network to a cosine guess');
    const wsStart = performance.now();
    // Every warm-start step in the history: the report draws the loss over every phase.
    const onStep = (step: number, loss: number) => {
      state.history.push({ step, stage: 'warm-start', total: loss, terms: {}, learningRate: ws.learningRate, seconds: (performance.now() - wsStart) / 1000, wallSeconds: (performance.now() - t0) / 1000 });
      opts.onWarmStart?.(step, ws.adamSteps, loss);
    };
    const r = await warmStartYielding(tf, nets, { x: reference.x, w, chiN: config.system.chiN, propagators: fromReference && ws.fitPropagator ? reference.propagators : undefined }, ws.adamSteps, ws.learningRate, onStep, opts.shouldStop ?? (() => false));
    if (r.interrupted) {
      // Nothing to resume from yet (the checkpoints start with the training steps): say so.
      nets.dispose();
      adam.dispose();
      throw new TrainingStopped('interrupted', `interrupted in the warm start at step ${r.steps} of ${ws.adamSteps}, before the first checkpoint; nothing to resume: run it again`, undefined, null);
    }
    training.warmStart = { adamSteps: r.steps, seconds: r.seconds, finalLoss: r.finalLoss };
  }

  const problem = new ScftProblem(tf, nets, config.system, config.collocation, config.training.strategy === 'alternating' ? 'detached' : config.losses.fieldInMde);
  problem.fieldsFrozen = config.training.strategy === 'alternating';
  const fieldUpdater = new FieldUpdater(tf, nets, config.system, { ...fieldUpdateSettings(config), periods: reference.periods });
  // The run it continues pinned the lamella's phase at its first field update: hold the same one.
  if (resumed) fieldUpdater.keepPin(resumed.file.fieldPin);
  const extra = resumed?.file.extraPoints;
  if (resumed && extra) problem.setExtraPoints(extra, Math.floor(resumed.file.step / config.collocation.resampleEvery));

  const refFile = solutionText(solutionToFile(reference, provenance(), config));
  const prov = () => ({ ...provenance({ backend: handle.backend, tfjs: handle.tfjsVersion }), backend: handle.backend, tfjs: handle.tfjsVersion });
  const save = async (st: LoopState, stageName: CheckpointFile['stage'], extraFiles: Record<string, string> = {}, metrics?: Record<string, unknown>, holds?: HeldState) => {
    if (!opts.outDir) return;
    const meta = {
      ...(holds ? { holds } : {}),
      provenance: prov(),
      config,
      length,
      periods: reference.periods,
      step: st.step,
      stage: stageName,
      lossWeights: st.lossWeights,
      history: st.history,
      ...(metrics ? { metrics } : {}),
      extraPoints: problem.extraPoints(),
      fieldPin: fieldUpdater.lamellarPin,
    };
    await saveCheckpoint(tf, opts.outDir, meta as Parameters<typeof saveCheckpoint>[2], [...nets.parameters.namedWeights(), ...adam.state()], { 'reference.json': refFile, ...extraFiles });
  };

  if (opts.onTrainingStart) {
    await opts.onTrainingStart({ tf, nets, problem, fieldUpdater, config, reference, warmStartSeconds: training.warmStart?.seconds ?? 0, phiError: () => phiErrorOf(tf, nets, config, reference) });
  }
  stage(`training (${handle.backend} backend, tfjs ${handle.tfjsVersion})`);
  const tLoop = performance.now();
  const loop = await runTraining(tf, problem, nets.parameters, adam, config, state, {
    fieldUpdate: () => void fieldUpdater.update(),
    onProgress: opts.onProgress,
    checkpoint: (st) => save(st, 'adam'),
    evaluate: () => phiErrorOf(tf, nets, config, reference),
    shouldStop: opts.shouldStop,
    wallSeconds: () => (performance.now() - t0) / 1000,
  });
  training.stopReason = loop.reason;
  training.message = loop.message;
  training.adamSteps = loop.state.step;
  training.reachedTarget = loop.reachedTarget;
  const trainingSeconds = () => loop.state.secondsBefore + (performance.now() - tLoop) / 1000;
  // The best state measured against the reference over every phase (issue 16: the last is not always the best).
  let best: { held: HeldState; x: Float64Array } | null = null;
  let last: Omit<HeldState, 'chosenBy' | 'phiError'> = { stage: 'adam', step: loop.state.step };
  const offer = (held: Omit<HeldState, 'chosenBy'>) => {
    if (held.phiError === undefined || !Number.isFinite(held.phiError)) return;
    if (!best || held.phiError < best.held.phiError!) best = { held: { ...held, chosenBy: 'lowest-reference-error' }, x: nets.parameters.flatten() };
  };
  const lastAdam = loop.state.history[loop.state.history.length - 1];
  if (lastAdam?.stage === 'adam' && lastAdam.step === loop.state.step) offer({ stage: 'adam', step: loop.state.step, phiError: lastAdam.phiError });

  if (loop.reason === 'diverged' || loop.reason === 'interrupted') {
    problem.dispose();
    adam.dispose();
    nets.dispose();
    const err = new TrainingStopped(loop.reason, loop.message, opts.outDir, loop.lastCheckpointStep);
    throw err;
  }

  // A run that met its φ_A target in the Adam phase stops there, polish included.
  if (config.training.lbfgsIterations > 0 && loop.reason !== 'target-reached') {
    stage(`L-BFGS polish (${config.training.lbfgsIterations} iterations)`);
    // Alternating: the polish, like the Adam steps, solves the MDE (and soft constraints) in the current fields.
    const weights =
      config.training.strategy === 'alternating'
        ? propagatorWeights(config)
        : (Object.fromEntries(LOSS_TERMS.map((k) => [k, config.losses.weights[k] * loop.state.lossWeights[k]])) as LossValues);
    // Alternating: polish in cycles, each a field update then L-BFGS on the MDE in the new fields.
    const tr = config.training;
    const cycles = tr.strategy === 'alternating' && nets.field ? tr.lbfgsCycles : 1;
    let r = { iterations: 0, f: Number.NaN, reason: 'none' };
    let iterations = 0;
    // A stop inside the polish saves the state the polish started from, not the half-polished
    // networks: L-BFGS carries its memory (the last 20 steps), the cycle's field step and the
    // iteration budget across iterations, and none of that is in a checkpoint. Saved half-way,
    // a resume restarted a fresh, full-budget L-BFGS from the half-polished point and ended
    // elsewhere than the uninterrupted run. From the polish's start it repeats the same
    // iterations and ends where the uninterrupted run ends (the polished iterations are redone).
    const polishStart = { x: nets.parameters.flatten(), history: loop.state.history.length };
    const stopInPolish = async (c: number) => {
      nets.parameters.unflatten(polishStart.x);
      loop.state.history.length = polishStart.history;
      await save(loop.state, 'adam');
      problem.dispose();
      adam.dispose();
      nets.dispose();
      return new TrainingStopped(
        'interrupted',
        `interrupted in the L-BFGS polish after ${iterations} iterations (cycle ${c + 1} of ${cycles}); checkpoint saved at step ${loop.state.step}, where the polish started: a resume repeats the polish from there`,
        opts.outDir,
        opts.outDir ? loop.state.step : null,
      );
    };
    for (let c = 0; c < cycles; c++) {
      // A stop asked before this cycle starts (during the field step or the evaluation of the last one).
      await yieldToEvents();
      if (opts.shouldStop?.()) throw await stopInPolish(c);
      const before = iterations;
      // Every L-BFGS iteration in the history (loss only); the cycle's end entry below adds the φA error.
      const onIteration = (it: number, f: number) => {
        loop.state.history.push({ step: loop.state.step, stage: 'lbfgs', total: f, terms: {}, learningRate: 0, seconds: trainingSeconds(), wallSeconds: (performance.now() - t0) / 1000, lbfgsIterations: before + it });
        opts.onLbfgs?.(before + it, tr.lbfgsIterations, f);
      };
      r = await polishCycle(tf, problem, nets.parameters, weights, Math.ceil(tr.lbfgsIterations / cycles), cycles > 1 ? () => fieldUpdater.update() : undefined, onIteration, opts.shouldStop);
      iterations += r.iterations;
      // A stop asked inside a cycle lands after the current L-BFGS iteration: saved as a stop between cycles is.
      if (r.reason === 'interrupted') throw await stopInPolish(c);
      // Measured after every cycle, like the Adam steps every evaluateEvery, for the history and the target.
      const phiError = tr.evaluateEvery > 0 ? phiErrorOf(tf, nets, config, reference) : undefined;
      loop.state.history.push({ step: loop.state.step, stage: 'lbfgs', total: r.f, terms: {}, learningRate: 0, seconds: trainingSeconds(), wallSeconds: (performance.now() - t0) / 1000, lbfgsIterations: iterations, ...(phiError !== undefined ? { phiError } : {}) });
      stage(`L-BFGS cycle ${c + 1}/${cycles}: ${iterations} iterations, loss ${r.f.toExponential(3)}${phiError !== undefined ? `, φA error ${phiError.toExponential(3)}` : ''}`);
      last = { stage: 'lbfgs', step: loop.state.step, lbfgsIterations: iterations };
      offer({ ...last, phiError });
      if (phiError !== undefined && tr.targetPhiError !== undefined && phiError < tr.targetPhiError) {
        training.reachedTarget = { step: loop.state.step, seconds: trainingSeconds(), lbfgsIterations: iterations };
        r = { ...r, reason: 'target-reached' };
        break;
      }
    }
    training.lbfgs = { iterations, finalLoss: r.f, reason: r.reason };
  }

  const tr = config.training;
  if (tr.secondOrderIterations > 0 && !training.reachedTarget) {
    stage(`second-order phase (Levenberg–Marquardt, up to ${tr.secondOrderIterations} iterations)`);
    const so = await runSecondOrder(
      nets,
      config.system,
      config.losses.weights,
      {
        iterations: tr.secondOrderIterations,
        nx: tr.secondOrder.nx ?? config.collocation.nx,
        nodesPerBlock: tr.secondOrder.nodesPerBlock ?? config.collocation.nodesPerBlock,
        contourSpread: config.collocation.contourSpread,
        damping: tr.secondOrder.damping,
        evaluateEvery: tr.secondOrder.evaluateEvery,
        targetPhiError: tr.targetPhiError,
        lossTolerance: tr.secondOrder.lossTolerance,
        strategy: tr.secondOrder.strategy,
        cycles: tr.secondOrder.cycles,
        firstCycleIterations: tr.secondOrder.firstCycleIterations,
        firstCyclePlateau: tr.secondOrder.firstCyclePlateau,
        ...(tr.secondOrder.stateNodesPerBlock !== undefined ? { stateNodesPerBlock: tr.secondOrder.stateNodesPerBlock } : {}),
        jointIterations: tr.secondOrder.jointIterations,
        outputLayerIterations: tr.secondOrder.outputLayerIterations,
        extraSteps: tr.secondOrder.extraSteps,
        fieldMixing: tr.fieldMixing,
        fieldStep: tr.secondOrder.fieldStep,
        andersonHistory: tr.secondOrder.andersonHistory,
        fieldStepDecay: tr.secondOrder.fieldStepDecay,
        periods: reference.periods,
      },
      {
        evaluate: () => phiErrorOf(tf, nets, config, reference),
        shouldStop: opts.shouldStop,
        onFieldStep: (f) => stage(`second-order field step ${f.cycle}: SCFT deviation max |d| ${f.residual.toExponential(2)} kT, move ${f.move.toExponential(2)} kT, field refit RMS ${f.fitRms.toExponential(2)} kT`),
        onProgress: opts.onSecondOrder ?? ((p) => stage(`second-order ${p.iteration}/${p.iterations}: loss ${p.loss.toExponential(3)}, μ ${p.mu.toExponential(2)}${p.phiError !== undefined ? `, φA error ${p.phiError.toExponential(3)}` : ''}`)),
        onRecord: (rec) =>
          loop.state.history.push({
            step: loop.state.step,
            stage: 'second-order',
            total: rec.loss,
            terms: rec.terms,
            learningRate: 0,
            seconds: trainingSeconds(),
            wallSeconds: (performance.now() - t0) / 1000,
            secondOrderIterations: rec.iteration,
            damping: rec.mu,
            ...(rec.phiError !== undefined ? { phiError: rec.phiError } : {}),
          }),
      },
    );
    training.secondOrder = { iterations: so.iterations, finalLoss: so.loss, reason: so.reason, seconds: so.seconds, best: so.best, ...(so.fieldSteps.length > 0 ? { fieldSteps: so.fieldSteps } : {}) };
    last = { stage: 'second-order', step: loop.state.step, secondOrderIterations: so.best.iteration };
    offer({ ...last, phiError: so.best.phiError });
    if (so.reachedTarget) training.reachedTarget = { step: loop.state.step, seconds: trainingSeconds() - so.seconds + so.reachedTarget.seconds, secondOrderIterations: so.reachedTarget.iteration };
    if (so.reason === 'interrupted') {
      const held: HeldState = best ? (best as { held: HeldState }).held : { ...last, chosenBy: 'last' };
      if (best) nets.parameters.unflatten((best as { x: Float64Array }).x);
      await save(loop.state, 'second-order', {}, undefined, held);
      problem.dispose();
      adam.dispose();
      nets.dispose();
      throw new TrainingStopped('interrupted', `interrupted in the second-order phase at iteration ${so.iterations}; checkpoint saved`, opts.outDir, loop.state.step);
    }
  }
  const kept = best as { held: HeldState; x: Float64Array } | null;
  if (kept) nets.parameters.unflatten(kept.x);
  training.holds = kept ? kept.held : { ...last, chosenBy: 'last' };
  training.seconds = (performance.now() - t0) / 1000;

  stage('evaluating against the reference');
  const { network, errors } = evaluateNetworks(tf, nets, config, reference, true);
  const freshResiduals = problem.freshResiduals(0x5eed, 1024);
  const target = config.training.targetPhiError;
  if (training.transferredFrom && target !== undefined) {
    // Reached in the Adam phase or in an L-BFGS cycle (then its iterations are in training.reachedTarget).
    const reached = training.reachedTarget ? { adamSteps: training.reachedTarget.step, seconds: training.reachedTarget.seconds } : null;
    const report: TransferReport = { targetPhiError: target, transfer: reached };
    if (config.training.transferBaseline === 'warm-start') {
      const b = await transferBaseline(opts, config);
      report.baseline = b;
      report.saved = reached ? { adamSteps: b.adamSteps - reached.adamSteps, seconds: b.seconds - reached.seconds, lowerBound: !b.reached } : null;
    }
    training.transfer = report;
  }
  const verdict = runVerdict(network, reference, errors, config.training.targetPhiError);
  const metrics: TrainMetrics = {
    backend: handle.backend,
    tfjs: handle.tfjsVersion,
    phase: verdict.ok ? network.phase : 'unconfirmed',
    networkPhase: network.phase,
    verdict,
    collapsed: network.phase === 'disordered',
    sharedPropagator: nets.shared,
    errors,
    freshResiduals,
    reference: summarize(reference, { periodTolerance: ref.search?.periodTolerance }),
    network: summarize(network),
    // Filled phase by phase above; checked complete here.
    training: throughSchema(trainMetricsSchema.shape.training, training),
    runSeconds: (performance.now() - t0) / 1000,
  };
  if (opts.outDir) {
    // The network's own phase stays in its solution file, with the verdict beside it when it is not ok.
    const judged = verdict.ok ? network : { ...network, notes: [...network.notes, `not confirmed against the reference: ${verdict.warnings.join('; ')}`] };
    const networkFile = solutionText(solutionToFile(judged, prov(), config));
    await save(loop.state, 'done', { 'metrics.json': formatText(trainMetricsFileSchema, { kind: 'train-metrics', version: TRAIN_METRICS_VERSION, ...metrics }, 2), 'network.json': networkFile }, metrics, training.holds);
  }
  problem.dispose();
  adam.dispose();
  nets.dispose();
  return { metrics, reference, network, handle, outDir: opts.outDir, history: loop.state.history };
}

/**
 * Settings that differ between a checkpoint's config and the config of a resume, as
 * "path: checkpoint A, config B" lines. The step budget may grow and the backend may change
 * (neither changes the curve the run follows); anything else would be silently ignored.
 */
export function changedSettings(saved: unknown, now: unknown, path = ''): string[] {
  if (path === 'training.adamSteps' || path === 'backend') return [];
  const isObj = (v: unknown): v is Record<string, unknown> => v !== null && typeof v === 'object' && !Array.isArray(v);
  if (isObj(saved) && isObj(now)) {
    const keys = [...new Set([...Object.keys(saved), ...Object.keys(now)])];
    return keys.flatMap((k) => changedSettings(saved[k], now[k], path ? `${path}.${k}` : k));
  }
  return JSON.stringify(saved) === JSON.stringify(now) ? [] : [`${path}: checkpoint ${JSON.stringify(saved)}, config ${JSON.stringify(now)}`];
}

/** A run that stopped before the end (diverged or interrupted): the checkpoint on disk is the last good one. */
export class TrainingStopped extends Error {
  constructor(
    readonly reason: StopReason,
    message: string,
    readonly dir: string | undefined,
    readonly lastCheckpointStep: number | null,
  ) {
    super(dir ? `${message}${lastCheckpointStep !== null ? ` (checkpoint: ${dir}, step ${lastCheckpointStep})` : ''}` : message);
    this.name = 'TrainingStopped';
  }
}


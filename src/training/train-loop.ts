/**
 * The optimisation loop: Adam (adam.ts) with an exponential learning-rate schedule, loss
 * balancing, resampling, logging, checkpoints, divergence and interruption handling,
 * then an optional L-BFGS polish (numerics/lbfgs.ts) on the flattened parameters.
 *
 * Loss balancing 'gradient-statistics' is the learning-rate annealing of Wang, Teng &
 * Perdikaris (SIAM J. Sci. Comput. 43, A3055 (2021), Alg. 1): every K steps
 *   λ̂_i = max|∇_θ L_mde| / mean|∇_θ L_i|,   λ_i ← (1 − α) λ_i + α λ̂_i,
 * for each term i other than the MDE residual, on top of the configured weights.
 */
import type { TrainConfig } from '../io/schemas/train-config.js';
import { lbfgsYielding } from '../numerics/lbfgs.js';
import { yieldToEvents } from '../runtime/stop.js';
import type { Adam } from '../autodiff/adam.js';
import type { Tf } from '../autodiff/tf.js';
import type { HistoryEntry } from './checkpoint.js';
import type { ParameterSet } from '../autodiff/parameters.js';
import { LOSS_TERMS, PROPAGATOR_TERMS, weightedTotal } from '../network/losses/terms.js';
import type { LossTensors, LossTerm, LossValues } from '../network/losses/terms.js';
import type { ScftProblem } from '../network/problem/scft-problem.js';
import { FieldUpdater, fieldUpdateSettings } from '../network/field-update.js';

export type StopReason = 'completed' | 'target-reached' | 'interrupted' | 'diverged';

export interface LoopState {
  step: number;
  lossWeights: LossValues;
  history: HistoryEntry[];
  bestTotal: number;
  /** Seconds of training before this session (for resumed runs). */
  secondsBefore: number;
}

export interface LoopHooks {
  /** Progress line for stderr. */
  onProgress?: (p: { step: number; steps: number; total: number; terms: LossValues; stepsPerSecond: number; secondsLeft: number; learningRate: number }) => void;
  /** Save a checkpoint of the current (good) state. */
  checkpoint?: (state: LoopState) => Promise<void>;
  /** φ_A relative L2 error against the reference, for early stopping and the history. */
  evaluate?: () => number;
  /** True once the user asked to stop (Ctrl-C). */
  shouldStop?: () => boolean;
  /** The field step of the alternating strategy: a FieldUpdater's, or the inverse estimator's own. */
  fieldUpdate?: () => void;
  /** Seconds since the whole run started, recorded in the history beside each step (wall-time axis of the report). */
  wallSeconds?: () => number;
}

export interface LoopResult {
  reason: StopReason;
  state: LoopState;
  /** Step at which the last checkpoint was written (the last good state on disk). */
  lastCheckpointStep: number | null;
  message: string;
  seconds: number;
  /** Step and time at which φ error first fell below the target (when evaluated). */
  reachedTarget?: { step: number; seconds: number };
}

export function learningRateAt(training: TrainConfig['training'], step: number): number {
  return training.learningRate * Math.pow(training.decay, step / training.decaySteps);
}

/**
 * Weights of the alternating strategy's propagator step: the MDE at 1, the soft-constraint
 * terms at their configured weights (0 when exact: the terms are then constant 0 anyway),
 * the field-equation terms at 0 (the fields follow the SCFT update instead).
 */
export function propagatorWeights(config: TrainConfig): LossValues {
  const w = config.losses.weights;
  return Object.fromEntries(LOSS_TERMS.map((k) => [k, k === 'mde' ? 1 : PROPAGATOR_TERMS.includes(k) ? w[k] : 0])) as LossValues;
}

/** One Wang–Teng–Perdikaris update of the balancing factors (see the file header). */
function rebalance(tf: Tf, problem: ScftProblem, params: ParameterSet, factors: LossValues, alpha: number): void {
  const vars = params.variables();
  const stats = {} as Record<LossTerm, { max: number; mean: number }>;
  // A term that is a constant here (exact form, no field network) has no gradient to measure.
  const active = LOSS_TERMS.filter((k) => problem.isActive(k));
  for (const k of active) {
    stats[k] = tf.tidy(() => {
      const { grads } = tf.variableGrads(() => problem.terms()[k], vars);
      const flat = params.flattenGradients(grads);
      let max = 0;
      let sum = 0;
      for (const g of flat) {
        const a = Math.abs(g);
        max = Math.max(max, a);
        sum += a;
      }
      return { max, mean: sum / flat.length };
    });
  }
  for (const k of active) {
    if (k === 'mde' || !(stats[k].mean > 0)) continue;
    const hat = stats.mde.max / stats[k].mean;
    factors[k] = (1 - alpha) * factors[k] + alpha * hat;
  }
}

export async function runTraining(tf: Tf, problem: ScftProblem, params: ParameterSet, adam: Adam, config: TrainConfig, state: LoopState, hooks: LoopHooks): Promise<LoopResult> {
  const tr = config.training;
  const baseWeights = config.losses.weights;
  const factors = { ...state.lossWeights };
  const vars = params.variables();
  const t0 = performance.now();
  let lastCheckpointStep: number | null = null;
  let reachedTarget: LoopResult['reachedTarget'];
  const elapsed = () => state.secondsBefore + (performance.now() - t0) / 1000;
  const startStep = state.step;
  const finish = (reason: StopReason, message: string): LoopResult => ({ reason, state: { ...state, lossWeights: { ...factors } }, lastCheckpointStep, message, seconds: elapsed(), reachedTarget });

  let lastTerms: LossValues | null = null;
  let updater: FieldUpdater | null = null;
  const fieldUpdate = hooks.fieldUpdate ?? (() => void (updater ??= new FieldUpdater(tf, problem.nets, problem.system, fieldUpdateSettings(config))).update());
  const effective = (): LossValues => Object.fromEntries(LOSS_TERMS.map((k) => [k, baseWeights[k] * factors[k]])) as LossValues;

  while (state.step < tr.adamSteps) {
    // One event-loop turn per step (a few µs): without it a signal handler never runs during training.
    await yieldToEvents();
    if (hooks.shouldStop?.()) {
      if (hooks.checkpoint) {
        await hooks.checkpoint({ ...state, lossWeights: { ...factors } });
        lastCheckpointStep = state.step;
      }
      return finish('interrupted', `interrupted at step ${state.step}; checkpoint saved at step ${state.step}`);
    }
    const step = state.step;
    if (step % config.collocation.resampleEvery === 0 && problem.resamplings !== step / config.collocation.resampleEvery) {
      problem.resample(step / config.collocation.resampleEvery);
    } else if (step === startStep && step > 0 && !problem.extraPoints() && config.collocation.random > 0) {
      problem.resample(Math.floor(step / config.collocation.resampleEvery));
    }
    if (config.losses.balancing === 'gradient-statistics' && tr.strategy === 'joint' && step % config.losses.balanceEvery === 0) {
      rebalance(tf, problem, params, factors, config.losses.balanceSmoothing);
    }
    if (tr.strategy === 'alternating' && step > startStep && step % tr.fieldUpdateEvery === 0) {
      fieldUpdate();
      problem.invalidateFields();
    }
    const lr = learningRateAt(tr, step);
    // Alternating: only the propagator terms drive the gradient (fields detached; see field-update.ts).
    const w = tr.strategy === 'alternating' ? propagatorWeights(config) : effective();
    const propagatorOnly = tr.strategy === 'alternating';
    const { total, terms } = tf.tidy(() => {
      let parts!: LossTensors;
      const { value, grads } = tf.variableGrads(() => {
        parts = problem.terms(true, propagatorOnly);
        for (const k of LOSS_TERMS) tf.keep(parts[k]);
        return weightedTotal(tf, parts, w);
      }, vars);
      const total = value.dataSync()[0];
      const terms = Object.fromEntries(LOSS_TERMS.map((k) => [k, parts[k].dataSync()[0]])) as LossValues;
      for (const k of LOSS_TERMS) parts[k].dispose();
      if (Number.isFinite(total) && total <= tr.divergenceFactor * state.bestTotal) adam.apply(grads, lr);
      return { total, terms };
    });
    if (!Number.isFinite(total) || total > tr.divergenceFactor * state.bestTotal) {
      const kept = lastCheckpointStep === null ? 'no checkpoint was written in this run' : `the last good checkpoint (step ${lastCheckpointStep}) is kept`;
      return finish('diverged', `training diverged at step ${step} (loss ${total}, best ${state.bestTotal.toExponential(3)}); ${kept}`);
    }
    state.bestTotal = Math.min(state.bestTotal, total);
    state.step = step + 1;
    if (propagatorOnly) {
      // The field terms are not trained on here; evaluate them (forward only) when logged.
      const logNow = state.step % tr.logEvery === 0 || state.step === tr.adamSteps || (tr.evaluateEvery > 0 && state.step % tr.evaluateEvery === 0);
      if (logNow || !lastTerms) {
        lastTerms = tf.tidy(() => {
          const t = problem.terms();
          return Object.fromEntries(LOSS_TERMS.map((k) => [k, t[k].dataSync()[0]])) as LossValues;
        });
      }
      for (const k of LOSS_TERMS) if (!PROPAGATOR_TERMS.includes(k)) terms[k] = lastTerms[k];
    }
    const done = state.step - startStep;
    const rate = done / Math.max(1e-9, (performance.now() - t0) / 1000);
    const last = state.step === tr.adamSteps;
    let phiError: number | undefined;
    if (hooks.evaluate && tr.evaluateEvery > 0 && (state.step % tr.evaluateEvery === 0 || last)) {
      phiError = hooks.evaluate();
      if (tr.targetPhiError !== undefined && phiError < tr.targetPhiError && !reachedTarget) reachedTarget = { step: state.step, seconds: elapsed() };
    }
    const wall = hooks.wallSeconds ? { wallSeconds: hooks.wallSeconds() } : {};
    if (state.step % tr.logEvery === 0 || last || phiError !== undefined) {
      state.history.push({ step: state.step, stage: 'adam', total, terms, learningRate: lr, seconds: elapsed(), ...wall, ...(phiError !== undefined ? { phiError } : {}) });
    } else {
      // Between logged steps, the total alone (its terms are not all evaluated every step): the report's loss curve needs every step.
      state.history.push({ step: state.step, stage: 'adam', total, terms: {}, learningRate: lr, seconds: elapsed(), ...wall });
    }
    hooks.onProgress?.({ step: state.step, steps: tr.adamSteps, total, terms, stepsPerSecond: rate, secondsLeft: (tr.adamSteps - state.step) / rate, learningRate: lr });
    if (hooks.checkpoint && (state.step % tr.checkpointEvery === 0 || last)) {
      await hooks.checkpoint({ ...state, lossWeights: { ...factors } });
      lastCheckpointStep = state.step;
    }
    if (reachedTarget) {
      if (hooks.checkpoint && lastCheckpointStep !== state.step) {
        await hooks.checkpoint({ ...state, lossWeights: { ...factors } });
        lastCheckpointStep = state.step;
      }
      return finish('target-reached', `φ_A error ${phiError!.toExponential(3)} below the target ${tr.targetPhiError} at step ${state.step}`);
    }
  }
  return finish('completed', `completed ${state.step} Adam steps`);
}

/**
 * One polish cycle: the field step when given (alternating strategy: a field update, after
 * which the frozen field values are stale), then L-BFGS in the fields as they now are. The
 * event loop turns after every L-BFGS iteration, so a Ctrl-C lands within one iteration:
 * `shouldStop()` true then ends the cycle with reason 'interrupted' (parameters at the last iterate).
 */
export async function polishCycle(tf: Tf, problem: ScftProblem, params: ParameterSet, weights: LossValues, iterations: number, fieldStep?: () => void, onIteration?: (it: number, f: number) => void, shouldStop?: () => boolean): Promise<{ iterations: number; f: number; reason: string }> {
  if (fieldStep) {
    fieldStep();
    problem.invalidateFields();
  }
  return polishWithLbfgs(tf, problem, params, weights, iterations, onIteration, shouldStop);
}

/** L-BFGS polish of all parameters on the same weighted loss (fixed collocation points), stoppable after any iteration. */
export async function polishWithLbfgs(tf: Tf, problem: ScftProblem, params: ParameterSet, weights: LossValues, iterations: number, onIteration?: (it: number, f: number) => void, shouldStop: () => boolean = () => false): Promise<{ iterations: number; f: number; reason: string }> {
  const vars = params.variables();
  const x0 = params.flatten();
  const objective = (x: Float64Array) => {
    params.unflatten(x);
    let out!: { f: number; g: Float64Array };
    tf.tidy(() => {
      const { value, grads } = tf.variableGrads(() => weightedTotal(tf, problem.terms(), weights), vars);
      out = { f: value.dataSync()[0], g: params.flattenGradients(grads) };
    });
    return out;
  };
  const r = await lbfgsYielding(objective, x0, { maxIterations: iterations, history: 20, gradientTolerance: 1e-9, onIteration: (it) => onIteration?.(it.iteration, it.f) }, yieldToEvents, shouldStop);
  params.unflatten(r.x);
  return { iterations: r.iterations, f: r.f, reason: r.reason };
}

/**
 * Training of a surrogate's field network (the 'alternating' scheme of the single-point
 * trainer, field-update.ts, with the parameter points drawn afresh every round and the
 * propagators solved exactly in the network's fields):
 *   fit     least squares of w/χN to reference fields on their x grid (the anchors, and extra
 *           solves if configured): Adam (Kingma & Ba, ICLR 2015; autodiff/adam.ts), then L-BFGS
 *           (numerics/lbfgs.ts) on the flattened parameters; or, with warmStart.method
 *           'levenberg-marquardt', float64 Levenberg–Marquardt (surrogate-lm-fit.ts);
 *   rounds  at the anchors and `pointsPerRound` random θ: the surrogate's solution (one
 *           spectral propagator solve in its fields, surrogate-model.ts) gives φ, the simple-
 *           mixing SCFT update of physics/scft-equations.ts gives w' = w + λ d (gauge fixed),
 *           and the network is refitted to w' at all those θ (L-BFGS). Its fixed point is the
 *           self-consistent field at every θ the rounds visit.
 * Units: x in Rg, t = x/L(θ), w in kT per chain (the network's output is w/χN).
 */
import type * as TfModule from '@tensorflow/tfjs';
import type { SurrogateConfig } from '../io/schemas/surrogate-config.js';
import type { SurrogateMetrics } from '../io/formats/surrogate.js';
import type { ScftSolution } from '../physics/result.js';
import { mixedFieldUpdate } from '../physics/scft-equations.js';
import { lbfgsYielding } from '../numerics/lbfgs.js';
import { RunStopped, stopRequested, yieldToEvents } from '../runtime/stop.js';
import { Adam } from '../autodiff/adam.js';
import type { Tf } from '../autodiff/tf.js';
import type { ParameterSet } from '../autodiff/parameters.js';
import { childSeed, Xorshift128 } from '../numerics/random.js';
import type { ParameterPoint } from './parameter-space.js';
import { fractionalGrid } from './surrogate-model.js';
import type { SurrogateModel } from './surrogate-model.js';
import { fitFieldsLm } from './surrogate-lm-fit.js';
import type { FieldTarget } from './surrogate-lm-fit.js';

/** A reference solution at a parameter point. */
export interface ReferencePoint {
  point: ParameterPoint;
  solution: ScftSolution;
}

/**
 * A surrogate run is short and not resumable: a stop (SIGINT/SIGTERM, runtime/stop.ts) inside a
 * fit ends it at once with nothing saved. Each Adam step and L-BFGS iteration yields to the
 * event loop first, so the signal handler gets to run at all.
 */
const STOPPED = 'surrogate training stopped by a signal while fitting the field network; nothing was saved (a surrogate run is not resumable: run it again)';

/** Adam steps on a loss of kept inputs; the loss of the last step. */
async function adamSteps(tf: Tf, params: ParameterSet, steps: number, learningRate: number, loss: () => TfModule.Scalar, onStep?: (step: number, value: number) => void): Promise<number> {
  const adam = new Adam(tf, params);
  const vars = params.variables();
  let last = Number.NaN;
  try {
    for (let step = 1; step <= steps; step++) {
      await yieldToEvents();
      if (stopRequested()) throw new RunStopped(STOPPED);
      last = tf.tidy(() => {
        const { value, grads } = tf.variableGrads(loss, vars);
        adam.apply(grads, learningRate);
        return value.dataSync()[0];
      });
      onStep?.(step, last);
    }
  } finally {
    adam.dispose();
  }
  return last;
}

/** L-BFGS iterations (float64 over the flattened float32 parameters) on a loss of kept inputs; the final loss. */
async function lbfgsSteps(tf: Tf, params: ParameterSet, iterations: number, loss: () => TfModule.Scalar, onIteration?: (it: number, value: number) => void): Promise<number> {
  const vars = params.variables();
  const r = await lbfgsYielding(
    (x) => {
      params.unflatten(x);
      let out!: { f: number; g: Float64Array };
      tf.tidy(() => {
        const { value, grads } = tf.variableGrads(loss, vars);
        out = { f: value.dataSync()[0], g: params.flattenGradients(grads) };
      });
      return out;
    },
    params.flatten(),
    { maxIterations: iterations, history: 20, gradientTolerance: 1e-10, onIteration: (it) => onIteration?.(it.iteration, it.f) },
    yieldToEvents,
    stopRequested,
  );
  if (r.reason === 'interrupted') throw new RunStopped(STOPPED);
  params.unflatten(r.x);
  return r.f;
}

export interface RoundResult {
  /** Largest SCFT residual max |d| (kT) of the network's fields over the round's points, before the update. */
  residual: number;
  fitLoss: number;
}

export class SurrogateTrainer {
  /** Levenberg–Marquardt iterations of the last LM fit. */
  private lmIterationsRun = 0;

  constructor(
    readonly tf: Tf,
    readonly model: SurrogateModel,
    readonly config: SurrogateConfig,
  ) {}

  /** Least squares of the network's n = w/χN to target fields at points (each on its own t_j = j/nx grid). */
  private async fitFields(targets: FieldTarget[], adam: { steps: number; learningRate: number }, lbfgsIterations: number, onStep?: (step: number, loss: number) => void, lm?: number): Promise<number> {
    const tf = this.tf;
    const field = this.model.field;
    const groups = targets.map((d) => this.model.group(d.point, fractionalGrid(d.w.A.length)));
    const features = field.features(groups);
    const values = tf.tensor2d(
      Float32Array.from(targets.flatMap((d) => Array.from({ length: 2 * d.w.A.length }, (_, k) => (k % 2 === 0 ? d.w.A[k >> 1] : d.w.B[k >> 1]) / d.point.chiN))),
      [features.v.shape[0], 2],
    );
    const loss = () => tf.mean(tf.square(tf.sub(field.forward(features), values))) as TfModule.Scalar;
    try {
      if (this.config.warmStart.method === 'levenberg-marquardt') {
        const iterations = lm ?? this.config.training.fitIterations;
        const r = await fitFieldsLm(field, groups, targets, iterations, yieldToEvents, stopRequested, onStep);
        if (r.reason === 'interrupted') throw new RunStopped(STOPPED);
        this.lmIterationsRun = r.iterations;
        return r.loss;
      }
      let last = await adamSteps(tf, field.parameters, adam.steps, adam.learningRate, loss, onStep);
      if (lbfgsIterations > 0) last = await lbfgsSteps(tf, field.parameters, lbfgsIterations, loss, (it, f) => onStep?.(adam.steps + it, f));
      return last;
    } finally {
      features.dispose();
      values.dispose();
    }
  }

  /** Warm start: fit to the reference fields of `data`. */
  async fit(data: ReferencePoint[], onStep?: (step: number, loss: number) => void): Promise<SurrogateMetrics['training']['fit']> {
    const t0 = performance.now();
    const ws = this.config.warmStart;
    const finalLoss = await this.fitFields(
      data.map((d) => ({ point: d.point, w: d.solution.w })),
      { steps: ws.adamSteps, learningRate: ws.learningRate },
      ws.lbfgsIterations,
      onStep,
      ws.lmIterations,
    );
    const seconds = (performance.now() - t0) / 1000;
    if (ws.method === 'levenberg-marquardt') return { method: ws.method, adamSteps: 0, lbfgsIterations: 0, lmIterations: this.lmIterationsRun, points: data.length, finalLoss, seconds };
    return { method: ws.method, adamSteps: ws.adamSteps, lbfgsIterations: ws.lbfgsIterations, points: data.length, finalLoss, seconds };
  }

  /**
   * The fit continued (from the network's current parameters) on more data: `iterations` LM
   * iterations, or L-BFGS iterations with 'adam-lbfgs' (no Adam steps: the network is already
   * near). The final fit loss.
   */
  async refit(data: ReferencePoint[], iterations: number, onStep?: (step: number, loss: number) => void): Promise<number> {
    return this.fitFields(
      data.map((d) => ({ point: d.point, w: d.solution.w })),
      { steps: 0, learningRate: 0 },
      iterations,
      onStep,
      iterations,
    );
  }

  /** Physics round number `index` (seeded by it) at the anchors and freshly drawn points. */
  async round(index: number, anchors: ParameterPoint[]): Promise<RoundResult> {
    const tr = this.config.training;
    const rng = new Xorshift128(childSeed(tr.seed, index));
    const points = [...anchors, ...Array.from({ length: tr.pointsPerRound }, () => this.model.space.draw(rng))];
    let residual = 0;
    const targets = this.model.solutions(points).map((sol, k) => {
      const u = mixedFieldUpdate(this.model.space.chain(points[k]), points[k].chiN, sol.w, sol.phi, tr.mixing);
      residual = Math.max(residual, u.residual);
      return { point: points[k], w: u.w };
    });
    const fitLoss = await this.fitFields(targets, { steps: 0, learningRate: 0 }, tr.fitIterations);
    return { residual, fitLoss };
  }
}

/**
 * The like-for-like training step of issue 7, the yardstick against which the trainer's
 * WASM speed is compared with PyTorch (bench/pytorch/mde_step.py computes the same thing):
 *
 *   network  u(x, s): tanh MLP 2 → H → H → H → 1 on the raw inputs (x, s),
 *            Glorot-uniform kernels from the seeded generator of src/numerics/random.ts;
 *   points   a tensor grid x_j = j·L/nx (j < nx = 64), s_i = (i + ½)/ns, n = nx·ns
 *            (ns = 32 for 2048 points, 64 for 4096), L = 4 Rg;
 *   loss     mean over the points of r², r = ∂s u − ∂xx u − (∂x u)² + w(x),
 *            w(x) = 2 cos(2π x / L) (the MDE in ln q form, docs/physics.md, D = 1);
 *   update   Adam (src/autodiff/adam.ts), learning rate 1e-3.
 *
 * Two builds of the same loss on the same variables:
 *   'fast'  — the trainer's own code: jets (src/autodiff/jet.ts) through Mlp.forward;
 *   'plain' — straightforward tfjs ops written out here (tf.matMul, tf.tanh, tf.sum), the
 *             independent implementation the fast one is tested against.
 */
import type * as TfModule from '@tensorflow/tfjs';
import { Adam } from '../autodiff/adam.js';
import type { Tf } from '../autodiff/tf.js';
import { Jet } from '../autodiff/jet.js';
import { Mlp } from '../autodiff/mlp.js';
import { ParameterSet } from '../autodiff/parameters.js';

export const LIKE_FOR_LIKE_PERIOD = 4;
export const LIKE_FOR_LIKE_NX = 64;
export const LIKE_FOR_LIKE_LEARNING_RATE = 1e-3;

export type StepVariant = 'fast' | 'plain';

export interface LikeForLikeProblem {
  mlp: Mlp;
  params: ParameterSet;
  /** The loss as a scalar tensor (inside tf.tidy / variableGrads). */
  loss(variant: StepVariant): TfModule.Scalar;
  /** One Adam step; returns the loss before the update. */
  step(variant: StepVariant): number;
  /** One Adam step from gradients computed elsewhere (a data-parallel split sums the shares'). */
  applyGradients(grads: TfModule.NamedTensorMap): void;
  /** Kernels and biases, layer by layer, row-major (to hand the same network to PyTorch). */
  weights(): { kernels: number[][]; biases: number[][]; shapes: number[][] };
  dispose(): void;
}

/** Grid coordinates of the problem (float64, before the one rounding to float32). */
export function likeForLikePoints(points: number): { x: Float64Array; s: Float64Array } {
  const nx = LIKE_FOR_LIKE_NX;
  if (points % nx !== 0) throw new RangeError(`points must be a multiple of ${nx}, got ${points}`);
  const ns = points / nx;
  const x = new Float64Array(points);
  const s = new Float64Array(points);
  for (let i = 0; i < ns; i++) {
    for (let j = 0; j < nx; j++) {
      x[i * nx + j] = (j * LIKE_FOR_LIKE_PERIOD) / nx;
      s[i * nx + j] = (i + 0.5) / ns;
    }
  }
  return { x, s };
}

/**
 * One share of the points for a data-parallel split: the rows of the s grid from
 * index·ns/count up to (index + 1)·ns/count, with the loss Σ r² over the share divided by
 * the full number of points, so that the shares' losses and gradients add up to the whole.
 */
export interface PointShare {
  index: number;
  count: number;
}

/** Layer widths of the network: 2 → H → H → H → 1. */
export function likeForLikeWidths(width: number): number[] {
  return [2, width, width, width, 1];
}

/** Number of parameters (kernels and biases) of the network of width H. */
export function likeForLikeParameterCount(width: number): number {
  const w = likeForLikeWidths(width);
  return w.slice(1).reduce((sum, out, l) => sum + w[l] * out + out, 0);
}

export function likeForLikeProblem(tf: Tf, width: number, allPoints: number, seed = 1, share?: PointShare): LikeForLikeProblem {
  const widths = likeForLikeWidths(width);
  const mlp = new Mlp(tf, { inputs: widths[0], hidden: widths.slice(1, -1), outputs: widths[widths.length - 1], activation: 'tanh', seed, name: 'u' });
  const params = new ParameterSet(tf, mlp.entries);
  const adam = new Adam(tf, params);
  const full = likeForLikePoints(allPoints);
  const ns = allPoints / LIKE_FOR_LIKE_NX;
  if (share && ns % share.count !== 0) throw new RangeError(`the ${ns} s rows do not split into ${share.count} equal shares`);
  const [from, to] = share ? [(share.index * allPoints) / share.count, ((share.index + 1) * allPoints) / share.count] : [0, allPoints];
  const x = full.x.subarray(from, to);
  const s = full.s.subarray(from, to);
  const points = to - from;
  // The share's part of the mean over all points (1 without a split).
  const shareOfMean = points / allPoints;
  const xs = new Float32Array(2 * points);
  const w = new Float32Array(points);
  for (let i = 0; i < points; i++) {
    xs[2 * i] = x[i];
    xs[2 * i + 1] = s[i];
    w[i] = 2 * Math.cos((2 * Math.PI * x[i]) / LIKE_FOR_LIKE_PERIOD);
  }
  // Constants made once, outside every step.
  const input = tf.keep(tf.tensor2d(xs, [points, 2]));
  const field = tf.keep(tf.tensor2d(w, [points, 1]));
  const dInput = { dx: tf.keep(tf.tensor2d([1, 0], [1, 2])), ds: tf.keep(tf.tensor2d([0, 1], [1, 2])) };
  const jetInput = new Jet(tf, input, dInput.dx, null, dInput.ds);

  const fastLoss = (): TfModule.Scalar => {
    const u = mlp.forward(jetInput);
    const r = tf.add(tf.sub(tf.sub(u.ds!, u.dxx!), tf.square(u.dx!)), field);
    const mean = tf.mean(tf.square(r)) as TfModule.Scalar;
    return shareOfMean === 1 ? mean : (tf.mul(mean, shareOfMean) as TfModule.Scalar);
  };

  // Written out with plain tfjs ops only (no jet class, no custom gradients).
  const plainLoss = (): TfModule.Scalar => {
    let v: TfModule.Tensor = input;
    let dx: TfModule.Tensor = tf.broadcastTo(dInput.dx, [points, 2]);
    let dxx: TfModule.Tensor = tf.zeros([points, 2]);
    let ds: TfModule.Tensor = tf.broadcastTo(dInput.ds, [points, 2]);
    const last = mlp.layers.length - 1;
    mlp.layers.forEach((layer, l) => {
      const W = layer.kernel as TfModule.Tensor2D;
      const z = tf.add(tf.matMul(v as TfModule.Tensor2D, W), layer.bias);
      const zx = tf.matMul(dx as TfModule.Tensor2D, W);
      const zxx = tf.matMul(dxx as TfModule.Tensor2D, W);
      const zs = tf.matMul(ds as TfModule.Tensor2D, W);
      if (l === last) {
        [v, dx, dxx, ds] = [z, zx, zxx, zs];
        return;
      }
      // tanh' = 1 − t², tanh'' = −2t(1 − t²).
      const t = tf.tanh(z);
      const d1 = tf.sub(1, tf.square(t));
      const d2 = tf.mul(-2, tf.mul(t, d1));
      v = t;
      dx = tf.mul(d1, zx);
      dxx = tf.add(tf.mul(d1, zxx), tf.mul(d2, tf.square(zx)));
      ds = tf.mul(d1, zs);
    });
    const r = tf.add(tf.sub(tf.sub(ds, dxx), tf.square(dx)), field);
    return tf.div(tf.sum(tf.square(r)), allPoints) as TfModule.Scalar;
  };

  const loss = (variant: StepVariant) => (variant === 'fast' ? fastLoss() : plainLoss());
  const vars = params.variables();
  return {
    mlp,
    params,
    loss,
    step(variant) {
      return tf.tidy(() => {
        const { value, grads } = tf.variableGrads(() => loss(variant), vars);
        const out = value.dataSync()[0];
        adam.apply(grads, LIKE_FOR_LIKE_LEARNING_RATE);
        return out;
      });
    },
    applyGradients(grads) {
      adam.apply(grads, LIKE_FOR_LIKE_LEARNING_RATE);
    },
    weights() {
      const kernels = mlp.layers.map((l) => Array.from(l.kernel.dataSync()));
      const biases = mlp.layers.map((l) => Array.from(l.bias.dataSync()));
      return { kernels, biases, shapes: mlp.layers.map((l) => l.kernel.shape) };
    },
    dispose() {
      adam.dispose();
      params.dispose();
      for (const t of [input, field, dInput.dx, dInput.ds]) t.dispose();
    },
  };
}

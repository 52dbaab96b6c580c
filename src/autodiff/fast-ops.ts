/**
 * Primitives that route around slow tfjs 4.22 WASM kernels (issue 7). Each one computes
 * exactly the function of the straightforward tfjs op named beside it, with a custom
 * gradient made of fast kernels only; tests/autodiff/fast-ops.test.ts checks values and
 * gradients of each against that op.
 *
 * Measured on WASM, one thread, here (src/bench/step-profile.ts and the table):
 *   - matMul with transposeA or transposeB (what tf.matMul's gradient uses) runs a slow
 *     path, 10–30× slower than a plain matMul; explicit transposes + plain matMul instead;
 *   - the 2-D Transpose kernel is slow at power-of-two row counts (4096×64: ~8 ms); the
 *     same permutation as a 3-D transpose of [rows/b, b, cols] → [cols, rows/b, b] runs
 *     3–15× faster (fastTranspose);
 *   - Sum over rows (the bias gradient, and the gradient of every row-broadcast product)
 *     is ~100× slower than the matMul ones[1, n]·a that computes the same sums (sumRows);
 *   - tanh is ~15× slower than sigmoid: tanh z = 2σ(2z) − 1 (fastTanh, WASM only: on the
 *     plain-JS backend tf.tanh is faster, and the native backend has one fused kernel).
 *
 * On WASM, where our own kernels (src/autodiff/wasm/kernels.ts) take the shape, the products, the weight
 * gradient and the row sums below go through them instead; the tfjs forms here remain the
 * path for other shapes and backends.
 *
 * setPlainOps(true) makes every primitive the straightforward op (tf.matMul, tf.tanh,
 * tf.sum, tf.transpose, broadcasting tf.mul/tf.add): the reference build for tests that
 * compare whole training runs, fast against plain.
 */
import type * as TfModule from '@tensorflow/tfjs';
import type { Tf } from './tf.js';
import { wasmKernels } from './wasm/kernels.js';

type Tensor = TfModule.Tensor;
type Save = (ts: Tensor[]) => void;
type Args = Array<Tensor | Save>;

let plain = false;

/** Use the straightforward tfjs ops everywhere (reference runs in tests); returns the old setting. */
export function setPlainOps(on: boolean): boolean {
  const old = plain;
  plain = on;
  return old;
}

export function plainOps(): boolean {
  return plain;
}

interface Ops {
  sigmoidTanh: (z: Tensor) => Tensor;
  matMul: (a: Tensor, w: Tensor) => Tensor;
  dense: (a: Tensor, w: Tensor, b: Tensor) => Tensor;
  mulRow: (a: Tensor, row: Tensor) => Tensor;
  addRow: (a: Tensor, row: Tensor) => Tensor;
  ones: Map<number, Tensor>;
}
const cache = new WeakMap<Tf, Ops>();

/** A kept ones[1, n] row (constant; one per row count). */
function onesRow(tf: Tf, o: Ops, n: number): Tensor {
  let t = o.ones.get(n);
  if (!t) {
    t = tf.keep(tf.ones([1, n]));
    o.ones.set(n, t);
  }
  return t;
}

/** Σ over rows of a [n, m] as [1, m], by ones[1, n]·a. */
function sumRowsWith(tf: Tf, o: Ops, a: Tensor): Tensor {
  const n = a.shape[0]!;
  if (n === 1) return a;
  const summed = wasmKernels(tf)?.columnSums(tf, a);
  if (summed) return summed;
  return tf.matMul(onesRow(tf, o, n) as TfModule.Tensor2D, a as TfModule.Tensor2D);
}

/** Block size for fastTranspose: the 3-D form pays for long, power-of-two-ish row counts. */
function transposeBlock(rows: number): number {
  if (rows < 256) return 0;
  for (const b of [32, 16, 8]) if (rows % b === 0) return b;
  return 0;
}

function transposeWith(tf: Tf, a: Tensor): Tensor {
  const [r, c] = a.shape as [number, number];
  // A transpose with a unit dimension is a reshape (no data moves).
  if (r === 1 || c === 1) return tf.reshape(a, [c, r]);
  const b = transposeBlock(r);
  if (b === 0) return tf.transpose(a);
  return tf.reshape(tf.transpose(tf.reshape(a, [r / b, b, c]), [2, 0, 1]), [c, r]);
}

/** dW = aᵀ·dy [in, out] through plain matMuls, transposing the narrower of a and dy. */
function weightGradient(tf: Tf, a: Tensor, dy: Tensor): Tensor {
  const own = wasmKernels(tf)?.weightGradient(tf, a, dy);
  if (own) return own;
  const inW = a.shape[1]!;
  const outW = dy.shape[1]!;
  // The right operand of a WASM matMul is packed at every call: keep the long, wide one left.
  if (inW <= outW || outW === 1) return tf.matMul(transposeWith(tf, a) as TfModule.Tensor2D, dy as TfModule.Tensor2D);
  return transposeWith(tf, tf.matMul(transposeWith(tf, dy) as TfModule.Tensor2D, a as TfModule.Tensor2D));
}

/** a·w by our WASM kernel where it applies, else tf.matMul (no gradient: used inside custom ops). */
function product(tf: Tf, a: Tensor, w: Tensor): Tensor {
  return wasmKernels(tf)?.matMul(tf, a, w) ?? tf.matMul(a as TfModule.Tensor2D, w as TfModule.Tensor2D);
}

function ops(tf: Tf): Ops {
  let o = cache.get(tf);
  if (o) return o;
  const ones = new Map<number, Tensor>();
  const self = { ones } as Ops;
  // tanh(z) = 2σ(2z) − 1, gradient dy·(1 − t²).
  self.sigmoidTanh = tf.customGrad((...args: Args) => {
    const [x, save] = args as [Tensor, Save];
    const t = tf.sub(tf.mul(tf.sigmoid(tf.mul(x, 2)), 2), 1);
    save([t]);
    return { value: t, gradFunc: (dy: Tensor, saved: Tensor[]) => tf.mul(dy, tf.sub(1, tf.square(saved[0]))) };
  }) as (z: Tensor) => Tensor;
  // a·w: da = dy·wᵀ (w is small: its transpose is cheap), dw = aᵀ·dy by weightGradient.
  const backward = (dy: Tensor, saved: Tensor[]) => {
    const [xs, ks] = saved;
    return [product(tf, dy, tf.transpose(ks)), weightGradient(tf, xs, dy)];
  };
  self.matMul = tf.customGrad((...args: Args) => {
    const [x, k, save] = args as [Tensor, Tensor, Save];
    save([x, k]);
    return { value: product(tf, x, k), gradFunc: backward };
  }) as (a: Tensor, w: Tensor) => Tensor;
  self.dense = tf.customGrad((...args: Args) => {
    const [x, k, b, save] = args as [Tensor, Tensor, Tensor, Save];
    save([x, k]);
    return {
      value: wasmKernels(tf)?.matMul(tf, x, k, b) ?? tf.add(tf.matMul(x as TfModule.Tensor2D, k as TfModule.Tensor2D), b),
      gradFunc: (dy: Tensor, saved: Tensor[]) => [...backward(dy, saved), tf.reshape(sumRowsWith(tf, self, dy), b.shape)],
    };
  }) as (a: Tensor, w: Tensor, b: Tensor) => Tensor;
  // a [n, m] ⊙ row [1, m] broadcast: da = dy ⊙ row, drow = Σ_rows dy ⊙ a.
  self.mulRow = tf.customGrad((...args: Args) => {
    const [x, r, save] = args as [Tensor, Tensor, Save];
    save([x, r]);
    return {
      value: tf.mul(x, r),
      gradFunc: (dy: Tensor, saved: Tensor[]) => [tf.mul(dy, saved[1]), sumRowsWith(tf, self, tf.mul(dy, saved[0]))],
    };
  }) as (a: Tensor, row: Tensor) => Tensor;
  // a [n, m] + row [1, m] broadcast: da = dy, drow = Σ_rows dy.
  self.addRow = tf.customGrad((...args: Args) => {
    const [x, r] = args as [Tensor, Tensor, Save];
    const shape = x.shape;
    return { value: tf.add(x, r), gradFunc: (dy: Tensor) => [tf.reshape(dy, shape), sumRowsWith(tf, self, dy)] };
  }) as (a: Tensor, row: Tensor) => Tensor;
  o = self;
  cache.set(tf, o);
  return o;
}

/** tanh (tf.tanh): on WASM 2σ(2z) − 1 with the gradient dy·(1 − t²). */
export function fastTanh(tf: Tf, z: Tensor): Tensor {
  return !plain && tf.getBackend() === 'wasm' ? ops(tf).sigmoidTanh(z) : tf.tanh(z);
}

/** a·w (tf.matMul) with an explicit-transpose gradient. */
export function matMulFast(tf: Tf, a: Tensor, w: Tensor): Tensor {
  return plain ? tf.matMul(a as TfModule.Tensor2D, w as TfModule.Tensor2D) : ops(tf).matMul(a, w);
}

/** Dense layer a·w + bias (tf.matMul + tf.add): the matMulFast gradient plus db = ones·dy. */
export function denseOp(tf: Tf, a: Tensor, w: Tensor, bias: Tensor): Tensor {
  return plain ? tf.add(tf.matMul(a as TfModule.Tensor2D, w as TfModule.Tensor2D), bias) : ops(tf).dense(a, w, bias);
}

/** 2-D transpose (tf.transpose), as a blocked 3-D transpose where that is faster. */
export function fastTranspose(tf: Tf, a: Tensor): Tensor {
  return plain ? tf.transpose(a) : transposeWith(tf, a);
}

/** Σ over the rows of a 2-D tensor, keeping the row axis ([1, m]; tf.sum(a, 0, true)). */
export function sumRows(tf: Tf, a: Tensor): Tensor {
  return plain ? tf.sum(a, 0, true) : sumRowsWith(tf, ops(tf), a);
}

/**
 * Elementwise a ⊙ b (tf.mul) where one side may be a single row [1, m] broadcast over the
 * n rows of the other: the broadcast side's gradient is then a ones·x matMul, not a Sum.
 */
export function mulBroadcast(tf: Tf, a: Tensor, b: Tensor): Tensor {
  if (plain) return tf.mul(a, b);
  const ra = a.shape[0];
  const rb = b.shape[0];
  if (a.rank === 2 && b.rank === 2 && ra !== rb) {
    if (rb === 1 && a.shape[1] === b.shape[1]) return ops(tf).mulRow(a, b);
    if (ra === 1 && a.shape[1] === b.shape[1]) return ops(tf).mulRow(b, a);
  }
  return tf.mul(a, b);
}

/** Elementwise a + b (tf.add) with the same row-broadcast rule as mulBroadcast. */
export function addBroadcast(tf: Tf, a: Tensor, b: Tensor): Tensor {
  if (plain) return tf.add(a, b);
  const ra = a.shape[0];
  const rb = b.shape[0];
  if (a.rank === 2 && b.rank === 2 && ra !== rb) {
    if (rb === 1 && a.shape[1] === b.shape[1]) return ops(tf).addRow(a, b);
    if (ra === 1 && a.shape[1] === b.shape[1]) return ops(tf).addRow(b, a);
  }
  return tf.add(a, b);
}

/**
 * Row gather out[r] = a[index[r]] with the gradient da[j] = Σ_{r: index[r] = j} dy[r] by
 * tf.scatterND (which sums repeated indices). tfjs's own gather gradient needs the
 * UnsortedSegmentSum kernel, which the WASM backend of 4.22 does not register, so this
 * is used in both builds.
 */
export function gatherRowsOp(tf: Tf, a: Tensor, index: Tensor): Tensor {
  const f = tf.customGrad((...args: Args) => {
    const [x, save] = args as [TfModule.Tensor2D, Save];
    const shape = x.shape;
    // Saved, not captured: a captured index made inside tf.grad's scope is gone by backward time.
    save([index]);
    return {
      value: tf.gather(x, index),
      gradFunc: (dy: Tensor, saved: Tensor[]) => tf.scatterND(tf.reshape(saved[0], [-1, 1]), dy, shape),
    };
  });
  return f(a);
}

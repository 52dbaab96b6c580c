/**
 * Jets: a tensor of values carried together with its derivatives with respect to the
 * network inputs x and s, propagated forward op by op (forward-mode differentiation with
 * a truncated Taylor expansion; Griewank & Walther, "Evaluating Derivatives", 2nd ed.,
 * SIAM 2008, ch. 13).
 *
 * Channels, all of the same shape as the values (typically [n points, width]) or
 * broadcastable to it (e.g. [1, width] when a derivative is the same at every point):
 *   v   — the values u
 *   dx  — ∂u/∂x
 *   dxx — ∂²u/∂x²
 *   ds  — ∂u/∂s
 * A channel that is null is identically zero (the quantity does not depend on that input,
 * or the caller chose not to track it: features built with no derivative channels give a
 * value-only forward pass through the same code).
 *
 * Why not nested tf.grad: in tfjs 4.22 a second-order tf.grad through tanh inside
 * tf.variableGrads silently returns wrong parameter gradients (docs/physics.md, "Network
 * solutions"). Here every channel is an ordinary first-order tfjs expression of the
 * parameters, so one tf.variableGrads pass over a loss built from jets gives correct
 * parameter gradients.
 *
 * Each op states the forward rule of every channel next to it (chain rule; Faà di Bruno's
 * formula to second order: (g∘f)'' = g''(f)·f'² + g'(f)·f'').
 */
import type * as TfModule from '@tensorflow/tfjs';
import { addBroadcast, denseOp, fastTanh, gatherRowsOp, matMulFast, mulBroadcast, plainOps } from './fast-ops.js';
import type { Tf } from './tf.js';
import { wasmKernels } from './wasm/kernels.js';

export type Tensor = TfModule.Tensor;
export type Channel = Tensor | null;

export class Jet {
  constructor(
    readonly tf: Tf,
    readonly v: Tensor,
    readonly dx: Channel,
    readonly dxx: Channel,
    readonly ds: Channel,
  ) {}

  /** An input-independent tensor: all derivative channels zero. */
  static constant(tf: Tf, v: Tensor): Jet {
    return new Jet(tf, v, null, null, null);
  }

  /** The same values with the derivative channels dropped (treat as constant). */
  valuesOnly(): Jet {
    return new Jet(this.tf, this.v, null, null, null);
  }

  private map(f: (c: Tensor) => Tensor, g: (c: Tensor) => Tensor = f): Jet {
    return new Jet(this.tf, f(this.v), opt(this.dx, g), opt(this.dxx, g), opt(this.ds, g));
  }

  /** (a + b)' = a' + b' in every channel. */
  add(b: Jet): Jet {
    const tf = this.tf;
    return new Jet(tf, tf.add(this.v, b.v), sum(tf, this.dx, b.dx), sum(tf, this.dxx, b.dxx), sum(tf, this.ds, b.ds));
  }

  /** (a − b)' = a' − b' in every channel. */
  sub(b: Jet): Jet {
    const tf = this.tf;
    return new Jet(tf, tf.sub(this.v, b.v), diff(tf, this.dx, b.dx), diff(tf, this.dxx, b.dxx), diff(tf, this.ds, b.ds));
  }

  /** −a: every channel negated. */
  neg(): Jet {
    return this.map((c) => this.tf.neg(c));
  }

  /**
   * Product rule: (ab)' = a'b + ab' (x and s); (ab)'' = a''b + 2a'b' + ab''.
   */
  mul(b: Jet): Jet {
    const tf = this.tf;
    const a = this;
    const v = tf.mul(a.v, b.v);
    const dx = sum(tf, prod(tf, a.dx, b.v), prod(tf, a.v, b.dx));
    const cross = a.dx && b.dx ? tf.mul(mulBroadcast(tf, a.dx, b.dx), 2) : null;
    const dxx = sum(tf, sum(tf, prod(tf, a.dxx, b.v), cross), prod(tf, a.v, b.dxx));
    const ds = sum(tf, prod(tf, a.ds, b.v), prod(tf, a.v, b.ds));
    return new Jet(tf, v, dx, dxx, ds);
  }

  /** c·a for an input-independent c (number or broadcastable tensor): (ca)' = c a'. */
  scale(c: number | Tensor): Jet {
    return this.map((t) => this.tf.mul(t, c));
  }

  /** a + c for an input-independent c: only the values change, (a + c)' = a'. */
  addConst(c: number | Tensor): Jet {
    return new Jet(this.tf, this.tf.add(this.v, c), this.dx, this.dxx, this.ds);
  }

  /** a²: (a²)' = 2a a', (a²)'' = 2a'² + 2a a''. */
  square(): Jet {
    return this.mul(this);
  }

  /**
   * Dense layer z = aW + b with input-independent W [in, out] and bias b [out]:
   * z' = a'W in every derivative channel (the bias drops out). The values use denseOp
   * (explicit-transpose gradient, see below).
   */
  matMul(w: Tensor, bias?: Tensor): Jet {
    const tf = this.tf;
    const mm = (c: Tensor) => matMulFast(tf, c, w);
    const v = bias ? denseOp(tf, this.v, w, bias) : mm(this.v);
    return new Jet(tf, v, opt(this.dx, mm), opt(this.dxx, mm), opt(this.ds, mm));
  }

  /**
   * Elementwise g(a) given g(a), g'(a), g''(a) as tensors:
   * ∂x: g'·a_x;  ∂xx: g'·a_xx + g''·a_x²;  ∂s: g'·a_s.
   */
  private chain(g: Tensor, g1: () => Tensor, g2: () => Tensor): Jet {
    const tf = this.tf;
    if (!this.dx && !this.dxx && !this.ds) return new Jet(tf, g, null, null, null);
    const d1 = g1();
    const dx = prod(tf, d1, this.dx);
    const dxx = sum(tf, prod(tf, d1, this.dxx), this.dx ? mulBroadcast(tf, g2(), tf.square(this.dx)) : null);
    const ds = prod(tf, d1, this.ds);
    return new Jet(tf, g, dx, dxx, ds);
  }

  /**
   * tanh: t' = 1 − t², t'' = −2t·t'. The value comes from fastTanh (sigmoid form).
   * This is the one statement of the rule: the fused WASM kernel (wasm/jet-tanh-kernel.ts)
   * computes the same and is tested against this method on plain tfjs ops.
   */
  tanh(): Jet {
    const tf = this.tf;
    // On WASM, all of the rule in one kernel each way.
    const fused = plainOps() ? null : wasmKernels(tf)?.jetTanh(tf, this.v, this.dx, this.dxx, this.ds);
    if (fused) return new Jet(tf, fused.t, fused.dx, fused.dxx, fused.ds);
    const t = fastTanh(tf, this.v);
    let one: Tensor | null = null;
    const d1 = () => (one ??= tf.sub(1, tf.square(t)));
    return this.chain(t, d1, () => tf.mul(tf.mul(t, d1()), -2));
  }

  /** sin: sin' = cos, sin'' = −sin. */
  sin(): Jet {
    const tf = this.tf;
    const s = tf.sin(this.v);
    return this.chain(s, () => tf.cos(this.v), () => tf.neg(s));
  }

  /** cos: cos' = −sin, cos'' = −cos. */
  cos(): Jet {
    const tf = this.tf;
    const c = tf.cos(this.v);
    return this.chain(c, () => tf.neg(tf.sin(this.v)), () => tf.neg(c));
  }

  /** exp: e' = e, e'' = e. */
  exp(): Jet {
    const tf = this.tf;
    const e = tf.exp(this.v);
    return this.chain(e, () => e, () => e);
  }

  /** Columns [begin, begin + size) of every channel (a linear map: channels sliced alike). */
  columns(begin: number, size: number): Jet {
    const tf = this.tf;
    const wide = this.v.shape[1] ?? 1;
    // A channel with one column broadcast across a wider value is the same for every column.
    return this.map((c) => (c.shape[1] === 1 && wide !== 1 ? c : tf.slice(c, [0, begin], [-1, size])));
  }

  /** Rows picked by an int32 index tensor [m] (a linear map; rows of broadcast channels stay). */
  gatherRows(index: Tensor): Jet {
    const tf = this.tf;
    const rows = this.v.shape[0];
    // A channel with one row broadcast over many points is the same for every point.
    return this.map((c) => (c.shape[0] === 1 && rows !== 1 ? c : gatherRowsOp(tf, c, index)));
  }

  /** Keep every channel out of the enclosing tf.tidy (for constant jets reused across steps). */
  keep(): this {
    for (const c of [this.v, this.dx, this.dxx, this.ds]) if (c) this.tf.keep(c);
    return this;
  }

  dispose(): void {
    for (const c of [this.v, this.dx, this.dxx, this.ds]) if (c) c.dispose();
  }
}

/** Row-wise concatenation of jets (stacking point sets); a null channel becomes zeros. */
export function concatRows(jets: Jet[]): Jet {
  const tf = jets[0].tf;
  const pick = (k: 'v' | 'dx' | 'dxx' | 'ds'): Channel => {
    if (jets.every((j) => j[k] === null)) return null;
    return tf.concat(
      jets.map((j) => {
        const c = j[k];
        return c === null ? tf.zerosLike(j.v) : c.shape[0] === j.v.shape[0] ? c : mulBroadcast(tf, tf.onesLike(j.v), c);
      }),
      0,
    );
  };
  return new Jet(tf, pick('v')!, pick('dx'), pick('dxx'), pick('ds'));
}

function opt(c: Channel, f: (c: Tensor) => Tensor): Channel {
  return c === null ? null : f(c);
}
// Channels may be single rows broadcast over the points: the *Broadcast primitives keep
// their gradients off the slow row-Sum kernel (fast-ops.ts).
function sum(tf: Tf, a: Channel, b: Channel): Channel {
  return a === null ? b : b === null ? a : addBroadcast(tf, a, b);
}
function diff(tf: Tf, a: Channel, b: Channel): Channel {
  return b === null ? a : a === null ? tf.neg(b) : tf.sub(a, b);
}
function prod(tf: Tf, a: Channel, b: Channel): Channel {
  return a === null || b === null ? null : mulBroadcast(tf, a, b);
}

export { denseOp, fastTanh, gatherRowsOp, matMulFast } from './fast-ops.js';

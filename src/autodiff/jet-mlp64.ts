/**
 * The MLP of mlp.ts evaluated in float64 at one point at a time, with the jet channels of
 * jet.ts (value, ∂x, ∂xx, ∂s) carried forward, and a reverse pass that gives the gradient
 * with respect to the parameters of any linear combination of the output channels,
 *     ∂/∂θ (ā_v·y + ā_x·∂x y + ā_xx·∂xx y + ā_s·∂s y),
 * in one sweep (reverse mode over the forward jet; Griewank & Walther, "Evaluating
 * Derivatives", 2nd ed., SIAM 2008, ch. 3 and 13). A physics residual that is linear in
 * the channels (the MDE in ln q form, with ā_x = −2D ∂x u) gets its whole Jacobian row from
 * one reverse pass per point. Why per point and not batched: the Jacobian of a residual is
 * one row per point anyway, and small layers (width ≤ 32) keep each pass in cache.
 *
 * Parameter layout: the flattened order of ParameterSet for the same Mlp — per layer, the
 * kernel [in, out] row-major, then the bias [out] — starting at `offset` of the vector.
 *
 * Activation rules, with t(z) and its derivatives t1, t2, t3 (tanh: t1 = 1 − t², t2 = −2 t t1,
 * t3 = −2 (t1² + t t2); sin: cos, −sin, −cos):
 *   forward  y = t,  y_x = t1 z_x,  y_xx = t2 z_x² + t1 z_xx,  y_s = t1 z_s
 *   reverse  z̄_x = ȳ_x t1 + 2 ȳ_xx t2 z_x,  z̄_xx = ȳ_xx t1,  z̄_s = ȳ_s t1,
 *            z̄_v = ȳ_v t1 + ȳ_x t2 z_x + ȳ_xx (t3 z_x² + t2 z_xx) + ȳ_s t2 z_s.
 * Units: whatever the inputs carry (the features of network/features.ts).
 */
import type { Activation } from './mlp.js';
import { instantiateJetKernel, jetKernelModule } from './jet-mlp64-kernel.js';
import type { JetKernelInstance } from './jet-mlp64-kernel.js';

/** Which channels a pass carries: values only, or value, ∂x, ∂xx and ∂s. */
export type JetChannels = 'value' | 'full';

const CHANNELS = 4; // v, x, xx, s

/** An input jet at one point: four arrays of the input width (null channels are zero). */
export interface PointJet {
  v: ArrayLike<number>;
  dx: ArrayLike<number> | null;
  dxx: ArrayLike<number> | null;
  ds: ArrayLike<number> | null;
}

export class JetMlp64 {
  readonly widths: number[];
  readonly size: number;
  /** Offsets (relative to `offset`) of each layer's kernel and bias. */
  private readonly kernelAt: number[] = [];
  private readonly biasAt: number[] = [];
  /** Per layer ℓ ≥ 1: pre-activation z (4 channels × width) and post-activation a; a⁰ is the input. */
  private readonly z: Float64Array[] = [];
  private readonly a: Float64Array[] = [];
  private readonly t: Float64Array[] = [];
  private readonly abar: Float64Array[] = [];
  private readonly zbar: Float64Array;
  /**
   * The f64x2 passes (jet-mlp64-kernel.ts) when their module was loaded before this network
   * was made and the activation is tanh: the same results, bit for bit. Doubles of its memory:
   * θ [0, size), the gradient [size, 2·size), then per layer a, z, t, ā (4 × width each), z̄.
   */
  private readonly kernel: { k: JetKernelInstance; a: number[]; z: number[]; t: number[]; abar: number[]; zbar: number; output: Float64Array; gradient: Float64Array } | null = null;
  /** Views of the last θ and gradient vectors handed in (by identity): one allocation per vector, not per point. */
  private thetaView: { of: Float64Array; view: Float64Array } | null = null;
  private gradView: { of: Float64Array; view: Float64Array } | null = null;

  constructor(
    inputs: number,
    hidden: readonly number[],
    outputs: number,
    readonly activation: Activation,
    /** Where this network's parameters start in the flat vector. */
    readonly offset: number,
  ) {
    this.widths = [inputs, ...hidden, outputs];
    let o = 0;
    for (let l = 0; l + 1 < this.widths.length; l++) {
      this.kernelAt.push(o);
      o += this.widths[l] * this.widths[l + 1];
      this.biasAt.push(o);
      o += this.widths[l + 1];
    }
    this.size = o;
    const maxW = Math.max(...this.widths);
    for (const w of this.widths) {
      this.z.push(new Float64Array(CHANNELS * w));
      this.a.push(new Float64Array(CHANNELS * w));
      this.t.push(new Float64Array(CHANNELS * w));
      this.abar.push(new Float64Array(CHANNELS * w));
    }
    this.zbar = new Float64Array(CHANNELS * maxW);
    const module = jetKernelModule();
    if (module && activation === 'tanh') {
      let top = 2 * this.size;
      const take = (w: number) => ((top += CHANNELS * w), top - CHANNELS * w);
      const a = this.widths.map(take);
      const z = this.widths.map(take);
      const t = this.widths.map(take);
      const abar = this.widths.map(take);
      const zbar = take(maxW);
      const k = instantiateJetKernel(module, top);
      const L = this.widths.length - 1;
      // The memory never grows, so views into it stay valid.
      this.kernel = { k, a, z, t, abar, zbar, output: k.memory.subarray(a[L], a[L] + CHANNELS * this.widths[L]), gradient: k.memory.subarray(this.size, 2 * this.size) };
    }
  }

  /**
   * Forward pass at one point; returns the output jet as [v₀…, x₀…, xx₀…, s₀…] (4 × outputs,
   * a view valid until the next call). With channels 'value' only the first block is filled.
   */
  forward(theta: Float64Array, input: PointJet, channels: JetChannels): Float64Array {
    if (this.kernel) return this.forwardKernel(theta, input, channels);
    const W = this.widths;
    const full = channels === 'full';
    const a0 = this.a[0];
    const n0 = W[0];
    a0.fill(0);
    for (let i = 0; i < n0; i++) {
      a0[i] = input.v[i];
      if (full) {
        if (input.dx) a0[n0 + i] = input.dx[i];
        if (input.dxx) a0[2 * n0 + i] = input.dxx[i];
        if (input.ds) a0[3 * n0 + i] = input.ds[i];
      }
    }
    const last = W.length - 2;
    for (let l = 0; l <= last; l++) {
      const nin = W[l];
      const nout = W[l + 1];
      const a = this.a[l];
      const z = this.z[l + 1];
      const K = this.offset + this.kernelAt[l];
      const B = this.offset + this.biasAt[l];
      const nc = full ? CHANNELS : 1;
      z.fill(0, 0, nc * nout);
      for (let o = 0; o < nout; o++) z[o] = theta[B + o];
      for (let i = 0; i < nin; i++) {
        const row = K + i * nout;
        for (let c = 0; c < nc; c++) {
          const ai = a[c * nin + i];
          if (ai === 0) continue;
          const zc = c * nout;
          for (let o = 0; o < nout; o++) z[zc + o] += ai * theta[row + o];
        }
      }
      const y = this.a[l + 1];
      if (l === last) {
        y.set(z.subarray(0, nc * nout));
        break;
      }
      const t = this.t[l + 1];
      for (let o = 0; o < nout; o++) {
        const zv = z[o];
        let t0: number, t1: number, t2: number, t3: number;
        if (this.activation === 'tanh') {
          t0 = Math.tanh(zv);
          t1 = 1 - t0 * t0;
          t2 = -2 * t0 * t1;
          t3 = -2 * (t1 * t1 + t0 * t2);
        } else {
          t0 = Math.sin(zv);
          t1 = Math.cos(zv);
          t2 = -t0;
          t3 = -t1;
        }
        t[o] = t1;
        t[nout + o] = t2;
        t[2 * nout + o] = t3;
        y[o] = t0;
        if (full) {
          const zx = z[nout + o];
          y[nout + o] = t1 * zx;
          y[2 * nout + o] = t2 * zx * zx + t1 * z[2 * nout + o];
          y[3 * nout + o] = t1 * z[3 * nout + o];
        }
      }
    }
    return this.a[W.length - 1];
  }

  /**
   * After forward() at the same point: add scale · ∂/∂θ (Σ_c Σ_o seed[c·outputs + o] · y_c,o)
   * into grad (a vector laid out like theta). `seed` is [v…, x…, xx…, s…] over the outputs;
   * with a 'value' forward only its value block may be non-zero.
   */
  backward(theta: Float64Array, seed: ArrayLike<number>, grad: Float64Array, scale = 1): void {
    if (this.kernel) return this.backwardKernel(theta, seed, grad, scale);
    const W = this.widths;
    const L = W.length - 1;
    let ybar = this.abar[L];
    for (let k = 0; k < CHANNELS * W[L]; k++) ybar[k] = scale * seed[k];
    const zbar = this.zbar;
    for (let l = L - 1; l >= 0; l--) {
      const nin = W[l];
      const nout = W[l + 1];
      // z̄ from ȳ: identity on the output layer, the activation rule on hidden layers.
      if (l === L - 1) {
        zbar.set(ybar.subarray(0, CHANNELS * nout));
      } else {
        const z = this.z[l + 1];
        const t = this.t[l + 1];
        for (let o = 0; o < nout; o++) {
          const t1 = t[o];
          const t2 = t[nout + o];
          const t3 = t[2 * nout + o];
          const zx = z[nout + o];
          const zxx = z[2 * nout + o];
          const zs = z[3 * nout + o];
          const bv = ybar[o];
          const bx = ybar[nout + o];
          const bxx = ybar[2 * nout + o];
          const bs = ybar[3 * nout + o];
          zbar[o] = bv * t1 + bx * t2 * zx + bxx * (t3 * zx * zx + t2 * zxx) + bs * t2 * zs;
          zbar[nout + o] = bx * t1 + 2 * bxx * t2 * zx;
          zbar[2 * nout + o] = bxx * t1;
          zbar[3 * nout + o] = bs * t1;
        }
      }
      const a = this.a[l];
      const K = this.offset + this.kernelAt[l];
      const B = this.offset + this.biasAt[l];
      for (let o = 0; o < nout; o++) grad[B + o] += zbar[o];
      const abar = this.abar[l];
      const needInput = l > 0;
      for (let i = 0; i < nin; i++) {
        const row = K + i * nout;
        for (let c = 0; c < CHANNELS; c++) {
          const ai = a[c * nin + i];
          const zc = c * nout;
          let back = 0;
          for (let o = 0; o < nout; o++) {
            const zb = zbar[zc + o];
            if (ai !== 0) grad[row + o] += ai * zb;
            if (needInput) back += theta[row + o] * zb;
          }
          if (needInput) abar[c * nin + i] = back;
        }
      }
      ybar = abar;
    }
  }

  /** forward() on the f64x2 passes: the same steps on the kernel's memory (byte offsets = 8 × index). */
  private forwardKernel(theta: Float64Array, input: PointJet, channels: JetChannels): Float64Array {
    const { k, a, z, t } = this.kernel!;
    const m = k.memory;
    const W = this.widths;
    const full = channels === 'full';
    m.set(this.slice(theta, 'theta'), 0);
    const n0 = W[0];
    const a0 = a[0];
    m.fill(0, a0, a0 + CHANNELS * n0);
    for (let i = 0; i < n0; i++) {
      m[a0 + i] = input.v[i];
      if (full) {
        if (input.dx) m[a0 + n0 + i] = input.dx[i];
        if (input.dxx) m[a0 + 2 * n0 + i] = input.dxx[i];
        if (input.ds) m[a0 + 3 * n0 + i] = input.ds[i];
      }
    }
    const last = W.length - 2;
    const nc = full ? CHANNELS : 1;
    for (let l = 0; l <= last; l++) {
      const nout = W[l + 1];
      k.exports.dense(8 * a[l], W[l], 8 * this.kernelAt[l], 8 * this.biasAt[l], nout, 8 * z[l + 1], nc);
      if (l === last) {
        m.copyWithin(a[l + 1], z[l + 1], z[l + 1] + nc * nout);
        break;
      }
      const zl = z[l + 1];
      const al = a[l + 1];
      for (let o = 0; o < nout; o++) m[al + o] = Math.tanh(m[zl + o]);
      k.exports.activate(8 * zl, 8 * t[l + 1], 8 * al, nout, full ? 1 : 0);
    }
    return this.kernel!.output;
  }

  /** backward() on the f64x2 passes: the gradient slice is copied in, added to and copied back. */
  private backwardKernel(theta: Float64Array, seed: ArrayLike<number>, grad: Float64Array, scale: number): void {
    const { k, a, z, t, abar, zbar, gradient } = this.kernel!;
    const m = k.memory;
    const W = this.widths;
    const L = W.length - 1;
    const size = this.size;
    m.set(this.slice(theta, 'theta'), 0);
    m.set(this.slice(grad, 'grad'), size);
    for (let c = 0; c < CHANNELS * W[L]; c++) m[abar[L] + c] = scale * seed[c];
    for (let l = L - 1; l >= 0; l--) {
      const K = this.kernelAt[l];
      k.exports.reverse(8 * t[l + 1], 8 * z[l + 1], 8 * abar[l + 1], 8 * zbar, 8 * a[l], W[l], W[l + 1], 8 * K, 8 * (size + K), 8 * (size + this.biasAt[l]), 8 * abar[l], l === L - 1 ? 1 : 0, l > 0 ? 1 : 0);
    }
    grad.set(gradient, this.offset);
  }

  /** This network's slice of a θ-sized vector, as a view kept while the same vector comes back. */
  private slice(v: Float64Array, which: 'theta' | 'grad'): Float64Array {
    const held = which === 'theta' ? this.thetaView : this.gradView;
    if (held && held.of === v) return held.view;
    const view = v.subarray(this.offset, this.offset + this.size);
    if (which === 'theta') this.thetaView = { of: v, view };
    else this.gradView = { of: v, view };
    return view;
  }
}

/**
 * Adam (Kingma & Ba, "Adam: A Method for Stochastic Optimization", ICLR 2015, Alg. 1):
 *   m ← β₁ m + (1 − β₁) g,  v ← β₂ v + (1 − β₂) g²,
 *   θ ← θ − α · m̂ / (√v̂ + ε),  m̂ = m / (1 − β₁ᵗ),  v̂ = v / (1 − β₂ᵗ).
 * Written here rather than taken from tf.train so that its state (m, v, t) is plain named
 * tensors that a checkpoint stores and a resumed run restores exactly.
 */
import type * as TfModule from '@tensorflow/tfjs';
import { plainOps } from './fast-ops.js';
import type { NamedWeight, ParameterSet } from './parameters.js';
import type { Tf } from './tf.js';
import { wasmKernels } from './wasm/kernels.js';

export interface AdamSettings {
  beta1: number;
  beta2: number;
  epsilon: number;
}

export const ADAM_DEFAULTS: AdamSettings = { beta1: 0.9, beta2: 0.999, epsilon: 1e-8 };

export class Adam {
  private m = new Map<string, TfModule.Tensor>();
  private v = new Map<string, TfModule.Tensor>();
  /** Number of updates applied so far (t in the paper). */
  step = 0;

  constructor(
    private readonly tf: Tf,
    private readonly params: ParameterSet,
    private readonly settings: AdamSettings = ADAM_DEFAULTS,
  ) {}

  /** Apply one update with learning rate lr from gradients keyed by tfjs variable name. */
  apply(grads: TfModule.NamedTensorMap, lr: number): void {
    const tf = this.tf;
    const { beta1, beta2, epsilon } = this.settings;
    this.step += 1;
    const c1 = 1 - Math.pow(beta1, this.step);
    const c2 = 1 - Math.pow(beta2, this.step);
    for (const e of this.params.entries) {
      const g = grads[e.variable.name];
      if (!g) continue;
      const mOld = this.m.get(e.name);
      const vOld = this.v.get(e.name);
      const [mNew, vNew] = tf.tidy(() => {
        // On WASM the lines below as one kernel (wasm/adam-kernel.ts), same arithmetic.
        const fused = plainOps() ? null : wasmKernels(tf)?.adamUpdate(tf, e.variable, g, mOld, vOld, { beta1, beta2, epsilon, lrOverC1: lr / c1, c2 });
        if (fused) {
          e.variable.assign(fused[0]);
          return [tf.keep(fused[1]), tf.keep(fused[2])];
        }
        const m = mOld ? tf.add(tf.mul(mOld, beta1), tf.mul(g, 1 - beta1)) : tf.mul(g, 1 - beta1);
        const v = vOld ? tf.add(tf.mul(vOld, beta2), tf.mul(tf.square(g), 1 - beta2)) : tf.mul(tf.square(g), 1 - beta2);
        const update = tf.div(tf.mul(m, lr / c1), tf.add(tf.sqrt(tf.div(v, c2)), epsilon));
        e.variable.assign(tf.sub(e.variable, update));
        return [tf.keep(m), tf.keep(v)];
      });
      mOld?.dispose();
      vOld?.dispose();
      this.m.set(e.name, mNew);
      this.v.set(e.name, vNew);
    }
  }

  /** Moment estimates as named tensors for a checkpoint ("adam/m/<param>", "adam/v/<param>"). */
  state(): NamedWeight[] {
    const out: NamedWeight[] = [];
    for (const [k, t] of this.m) out.push({ name: `adam/m/${k}`, tensor: t });
    for (const [k, t] of this.v) out.push({ name: `adam/v/${k}`, tensor: t });
    return out;
  }

  restore(step: number, weights: TfModule.NamedTensorMap): void {
    this.dispose();
    this.step = step;
    for (const [name, t] of Object.entries(weights)) {
      if (name.startsWith('adam/m/')) this.m.set(name.slice(7), this.tf.clone(t));
      else if (name.startsWith('adam/v/')) this.v.set(name.slice(7), this.tf.clone(t));
    }
  }

  dispose(): void {
    for (const t of this.m.values()) t.dispose();
    for (const t of this.v.values()) t.dispose();
    this.m.clear();
    this.v.clear();
  }
}

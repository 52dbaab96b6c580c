/**
 * mesofield's own WASM kernels (src/autodiff/wasm, through wasm/kernels.ts) against the straightforward tfjs ops they
 * replace, in value and gradient, to float32 rounding:
 *   - the fused jet tanh against Jet.tanh built from plain tfjs ops (tf.tanh, tf.mul, …,
 *     differentiated by tfjs), for every combination of absent, per-point and one-row
 *     derivative channels: Jet.tanh is the one statement of the tanh rule, and this is
 *     what ties the kernel's hand-written WAT to it (jet-tanh-kernel.ts says why);
 *   - column sums against tf.sum over axis 0;
 *   - the weight gradient aᵀ·dy against tf.matMul(a, dy, transposeA), across its chunk
 *     boundaries (64 rows), its block shapes and its one-column form;
 *   - the dense product a·w (+ bias) against tf.matMul (+ tf.add), remainder rows and the
 *     one-column form included;
 *   - the fused Adam update against the same Adam written in tfjs ops (setPlainOps), over
 *     several steps, for tensor sizes with and without a remainder mod 4.
 */
import { afterEach, beforeAll, describe, expect, it } from 'vitest';
import type * as TfModule from '@tensorflow/tfjs';
import { selectBackend, type Tf } from '../../src/autodiff/backend.js';
import { Adam } from '../../src/autodiff/adam.js';
import { setPlainOps, sumRows } from '../../src/autodiff/fast-ops.js';
import { ParameterSet } from '../../src/autodiff/parameters.js';
import { Jet } from '../../src/autodiff/jet.js';
import { wasmKernels } from '../../src/autodiff/wasm/kernels.js';
import { expectClose } from '../helpers/expect-close.js';

/** Deterministic values in (−2, 2) (an LCG; Numerical Recipes §7.1 constants). */
function values(n: number, seed: number): Float32Array {
  let r = seed >>> 0;
  return Float32Array.from({ length: n }, () => ((r = (Math.imul(r, 1664525) + 1013904223) >>> 0) / 2 ** 32) * 4 - 2);
}

afterEach(() => {
  setPlainOps(false);
});

describe('WASM kernels of our own', () => {
  let tf: Tf;
  beforeAll(async () => {
    tf = (await selectBackend('wasm')).tf;
  });
  /** The kernels through their one interface (installed when the backend started). */
  const kernels = () => {
    const k = wasmKernels(tf);
    if (!k) throw new Error('the WASM kernels are not installed');
    return k;
  };
  const t2 = (r: number, c: number, seed: number) => tf.tensor2d(values(r * c, seed), [r, c]);

  type Form = 'none' | 'full' | 'row';
  const forms: Form[] = ['none', 'full', 'row'];
  const cases = forms.flatMap((x) => (['none', 'full'] as Form[]).flatMap((xx) => forms.map((s) => [x, xx, s] as const)));

  it.each(cases)('jet tanh with ∂x %s, ∂xx %s, ∂s %s: values and gradients equal the channel-by-channel jet', (x, xx, s) => {
    const [n, h] = [37, 8];
    const channel = (f: Form, seed: number) => (f === 'none' ? null : t2(f === 'row' ? 1 : n, h, seed));
    tf.tidy(() => {
      const inputs = [t2(n, h, 1), channel(x, 2), channel(xx, 3), channel(s, 4)];
      const present = inputs.filter((c): c is TfModule.Tensor => c !== null);
      const weights = [5, 6, 7, 8].map((seed) => t2(n, h, seed));
      // L = Σ_c w_c ⊙ out_c over the output channels, a function of the present inputs.
      const loss = (plain: boolean) => (...ts: TfModule.Tensor[]) => {
        setPlainOps(plain);
        let k = 0;
        const pick = (c: TfModule.Tensor | null) => (c === null ? null : ts[k++]);
        const [v, dx, dxx, ds] = inputs.map(pick);
        const out = new Jet(tf, v!, dx, dxx, ds).tanh();
        setPlainOps(false);
        let sum = tf.sum(tf.mul(out.v, weights[0]));
        [out.dx, out.dxx, out.ds].forEach((c, i) => {
          if (c) sum = tf.add(sum, tf.sum(tf.mul(c, weights[i + 1])));
        });
        return sum as TfModule.Scalar;
      };
      const fused = kernels().jetTanh(tf, inputs[0]!, inputs[1], inputs[2], inputs[3]);
      if (x === 'none' && xx === 'none' && s === 'none') expect(fused).toBeNull();
      else expect(fused).not.toBeNull();
      const a = tf.valueAndGrads(loss(false))(present);
      const b = tf.valueAndGrads(loss(true))(present);
      expectClose([a.value.dataSync()[0]], [b.value.dataSync()[0]], 2e-6, 'loss');
      a.grads.forEach((g, i) => {
        expect(g.shape).toEqual(present[i].shape);
        expectClose(g.dataSync(), b.grads[i].dataSync(), 1e-5, `gradient ${i}`);
      });
    });
  });

  it('column sums equal tf.sum over the rows, in value and gradient', () => {
    tf.tidy(() => {
      for (const [r, c] of [
        [1000, 32],
        [3, 4],
        [2048, 64],
      ]) {
        const a = t2(r, c, r);
        const w = t2(1, c, 9);
        expectClose(sumRows(tf, a).dataSync(), tf.sum(a, 0, true).dataSync(), 1e-6, `${r}×${c} sums`);
        const g = tf.grad((x: TfModule.Tensor) => tf.sum(tf.mul(sumRows(tf, x), w)))(a);
        expectClose(g.dataSync(), tf.mul(tf.onesLike(a), w).dataSync(), 0, `${r}×${c} gradient`);
      }
    });
  });

  it('the weight gradient aᵀ·dy equals tf.matMul with transposeA, across chunk boundaries and block shapes', () => {
    tf.tidy(() => {
      for (const [n, i, o] of [
        [600, 8, 16],
        [256, 12, 8],
        [1, 4, 8],
        [4096, 64, 64],
        [37, 32, 32],
        [300, 2, 16],
        [300, 7, 8],
        [4096, 64, 1],
        [9, 4, 1],
      ]) {
        const a = t2(n, i, n + i);
        const dy = t2(n, o, n + o + 1);
        const own = kernels().weightGradient(tf, a, dy);
        expect(own, `${n}, ${i}, ${o}`).not.toBeNull();
        const ref = tf.matMul(a as TfModule.Tensor2D, dy as TfModule.Tensor2D, true, false);
        expect(own!.shape).toEqual([i, o]);
        expectClose(own!.dataSync(), ref.dataSync(), 2e-6 * Math.sqrt(n), `${n}×${i}ᵀ·${n}×${o}`);
      }
      // Shapes outside the kernel's blocks are left to tfjs.
      expect(kernels().weightGradient(tf, t2(10, 6, 1), t2(10, 12, 2))).toBeNull();
      expect(kernels().weightGradient(tf, t2(10, 6, 1), t2(10, 1, 2))).toBeNull();
    });
  });

  it('the dense product a·w (+ bias) equals tf.matMul (+ tf.add), with rows beyond a multiple of 4', () => {
    tf.tidy(() => {
      for (const [n, k, m] of [
        [2048, 32, 32],
        [7, 2, 8],
        [1, 5, 16],
        [301, 64, 64],
        [2048, 32, 1],
        [5, 4, 1],
      ]) {
        const a = t2(n, k, n + k);
        const w = t2(k, m, k + m);
        const b = tf.tensor1d(values(m, m));
        expectClose(kernels().matMul(tf, a, w)!.dataSync(), tf.matMul(a as TfModule.Tensor2D, w as TfModule.Tensor2D).dataSync(), 2e-6 * Math.sqrt(k), `${n}×${k}·${k}×${m}`);
        const withBias = kernels().matMul(tf, a, w, b)!;
        expect(withBias.shape).toEqual([n, m]);
        expectClose(withBias.dataSync(), tf.add(tf.matMul(a as TfModule.Tensor2D, w as TfModule.Tensor2D), b).dataSync(), 2e-6 * Math.sqrt(k), `${n}×${k}·${k}×${m} + b`);
      }
      expect(kernels().matMul(tf, t2(5, 4, 1), t2(4, 6, 2))).toBeNull();
      expect(kernels().matMul(tf, t2(5, 6, 1), t2(6, 1, 2))).toBeNull();
    });
  });

  it('the fused Adam update follows the tfjs-ops Adam step for step (sizes 3, 35, 64)', () => {
    const run = (plain: boolean) => {
      setPlainOps(plain);
      const shapes = [[3], [5, 7], [8, 8]];
      const entries = shapes.map((shape, i) => ({ name: `p${i}`, variable: tf.variable(tf.tensor(values(shape.reduce((a, b) => a * b, 1), 20 + i), shape)) }));
      const params = new ParameterSet(tf, entries);
      const adam = new Adam(tf, params);
      for (let step = 0; step < 4; step++) {
        tf.tidy(() => {
          const grads = Object.fromEntries(entries.map((e, i) => [e.variable.name, tf.tensor(values(e.variable.size, 100 * step + i), e.variable.shape)]));
          adam.apply(grads, 0.01 * (step + 1));
        });
      }
      const out = [Array.from(params.flatten()), ...adam.state().map((w) => Array.from(w.tensor.dataSync()))];
      setPlainOps(false);
      adam.dispose();
      params.dispose();
      return out;
    };
    const fused = run(false);
    const plain = run(true);
    expect(fused.length).toBe(plain.length);
    fused.forEach((f, i) => expectClose(f, plain[i], 1e-6, `parameters / moments ${i}`));
  });
});

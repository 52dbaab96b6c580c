/**
 * The fast primitives of src/autodiff/fast-ops.ts against the straightforward tfjs ops they
 * replace (the independent implementation: tf.matMul, tf.tanh, tf.sum, tf.transpose,
 * broadcasting tf.mul / tf.add and tfjs's own gradients of them), in value and gradient,
 * to float32 rounding; then whole steps and a whole seeded training run built with the
 * fast primitives against the same built with plain ops (setPlainOps).
 */
import { afterEach, beforeAll, describe, expect, it } from 'vitest';
import type * as TfModule from '@tensorflow/tfjs';
import { likeForLikeProblem } from '../../src/bench/like-for-like.js';
import { trainConfigSchema } from '../../src/io/schemas/train-config.js';
import { selectBackend, type BackendName, type Tf } from '../../src/autodiff/backend.js';
import { addBroadcast, denseOp, fastTanh, fastTranspose, matMulFast, mulBroadcast, setPlainOps, sumRows } from '../../src/autodiff/fast-ops.js';
import { trainRun } from '../../src/training/train-run.js';
import { expectClose } from '../helpers/expect-close.js';

/** Deterministic values in (−2, 2) (an LCG; Numerical Recipes §7.1 constants). */
function values(n: number, seed: number): Float32Array {
  let r = seed >>> 0;
  return Float32Array.from({ length: n }, () => ((r = (Math.imul(r, 1664525) + 1013904223) >>> 0) / 2 ** 32) * 4 - 2);
}

afterEach(() => {
  setPlainOps(false);
});

describe.each(['wasm', 'cpu'] as BackendName[])('fast primitives on the %s backend', (kind) => {
  let tf: Tf;
  beforeAll(async () => {
    tf = (await selectBackend(kind)).tf;
  });
  const t2 = (r: number, c: number, seed: number) => tf.tensor2d(values(r * c, seed), [r, c]);

  /** Value and gradients of sum(f(inputs) ⊙ c) for a fixed random c, fast against reference. */
  function compare(what: string, fast: (...x: TfModule.Tensor[]) => TfModule.Tensor, ref: (...x: TfModule.Tensor[]) => TfModule.Tensor, inputs: TfModule.Tensor[], rel = 2e-6): void {
    tf.tidy(() => {
      const out = ref(...inputs);
      const c = tf.tensor(values(out.size, 99), out.shape);
      expectClose(fast(...inputs).dataSync(), out.dataSync(), rel, `${what} value`);
      const gf = tf.grads((...x: TfModule.Tensor[]) => tf.sum(tf.mul(fast(...x), c)))(inputs);
      const gr = tf.grads((...x: TfModule.Tensor[]) => tf.sum(tf.mul(ref(...x), c)))(inputs);
      gf.forEach((g, i) => {
        expect(g.shape, `${what} gradient ${i} shape`).toEqual(inputs[i].shape);
        expectClose(g.dataSync(), gr[i].dataSync(), rel * 5, `${what} gradient ${i}`);
      });
    });
  }

  it('fastTranspose equals tf.transpose exactly (blocked and unblocked row counts, unit dimensions)', () => {
    for (const [r, c] of [
      [512, 8],
      [4096, 3],
      [2112, 5],
      [300, 7],
      [33, 4],
      [1, 6],
      [9, 1],
    ]) {
      tf.tidy(() => {
        const a = t2(r, c, r + c);
        expect(Array.from(fastTranspose(tf, a).dataSync()), `${r}×${c}`).toEqual(Array.from(tf.transpose(a).dataSync()));
        expect(fastTranspose(tf, a).shape).toEqual([c, r]);
      });
    }
  });

  it('sumRows equals tf.sum over axis 0 (value and gradient)', () => {
    compare('sumRows', (a) => sumRows(tf, a), (a) => tf.sum(a, 0, true), [t2(640, 6, 1)]);
    compare('sumRows one row', (a) => sumRows(tf, a), (a) => tf.sum(a, 0, true), [t2(1, 6, 2)]);
  });

  it('dense layer and matMul equal tf.matMul (+ bias) in value and every gradient, both transpose branches', () => {
    // in < out, in > out, out = 1, and a broadcast row input.
    for (const [n, i, o] of [
      [320, 3, 8],
      [320, 8, 3],
      [288, 8, 1],
      [1, 4, 5],
    ]) {
      compare(`dense ${n}×${i}→${o}`, (a, w, b) => denseOp(tf, a, w, b), (a, w, b) => tf.add(tf.matMul(a as TfModule.Tensor2D, w as TfModule.Tensor2D), b), [t2(n, i, n), t2(i, o, i), tf.tensor1d(values(o, o))]);
      compare(`matMul ${n}×${i}→${o}`, (a, w) => matMulFast(tf, a, w), (a, w) => tf.matMul(a as TfModule.Tensor2D, w as TfModule.Tensor2D), [t2(n, i, n + 1), t2(i, o, i + 1)]);
    }
  });

  it('row-broadcast products and sums equal broadcasting tf.mul / tf.add (either operand the row)', () => {
    compare('mul row right', (a, r) => mulBroadcast(tf, a, r), (a, r) => tf.mul(a, r), [t2(300, 5, 3), t2(1, 5, 4)]);
    compare('mul row left', (r, a) => mulBroadcast(tf, r, a), (r, a) => tf.mul(r, a), [t2(1, 5, 5), t2(300, 5, 6)]);
    compare('mul same shape', (a, b) => mulBroadcast(tf, a, b), (a, b) => tf.mul(a, b), [t2(30, 5, 7), t2(30, 5, 8)]);
    compare('add row right', (a, r) => addBroadcast(tf, a, r), (a, r) => tf.add(a, r), [t2(300, 5, 9), t2(1, 5, 10)]);
    compare('add row left', (r, a) => addBroadcast(tf, r, a), (r, a) => tf.add(r, a), [t2(1, 5, 11), t2(300, 5, 12)]);
  });

  it('fastTanh equals tf.tanh (value and gradient)', () => {
    compare('tanh', (z) => fastTanh(tf, z), (z) => tf.tanh(z), [tf.tensor2d([[-9, -3, -0.5, 0, 0.2, 1.7, 6, 12]])]);
  });

  it('the like-for-like step: fast and plain builds give the same loss, gradients and Adam trajectory', () => {
    // Same variables, two builds of the loss (src/bench/like-for-like.ts): the jets with fast
    // primitives, and the channels written out with plain tfjs ops.
    const p = likeForLikeProblem(tf, 8, 256, 3);
    const vars = p.params.variables();
    tf.tidy(() => {
      const f = tf.variableGrads(() => p.loss('fast'), vars);
      const r = tf.variableGrads(() => p.loss('plain'), vars);
      expectClose([f.value.dataSync()[0]], [r.value.dataSync()[0]], 1e-5, 'loss');
      // (The output bias does not enter the loss, which uses derivative channels only: zero gradient.)
      expectClose(p.params.flattenGradients(f.grads), p.params.flattenGradients(r.grads), 1e-4, 'parameter gradients');
    });
    const x0 = p.params.flatten();
    const fast = Array.from({ length: 8 }, () => p.step('fast'));
    // A second problem with the same seed, stepped with the plain build.
    const q = likeForLikeProblem(tf, 8, 256, 3);
    expect(Array.from(q.params.flatten())).toEqual(Array.from(x0));
    const plain = Array.from({ length: 8 }, () => q.step('plain'));
    expectClose(fast, plain, 1e-4, 'losses of 8 Adam steps');
    expect(fast[7]).toBeLessThan(fast[0]);
    p.dispose();
    q.dispose();
  });
});

describe('training results are unchanged by the fast primitives', () => {
  it('a seeded short run gives the same loss history with fast and with plain ops (wasm)', async () => {
    // The f = 0.4, χN = 15 diblock (not palindromic: two propagator networks, junction
    // terms, resampled points, alternating field updates): every code path of the step.
    const config = trainConfigSchema.parse({
      version: 2,
      kind: 'train',
      system: { chain: { type: 'diblock', f: 0.4 }, chiN: 15 },
      cell: { nx: 32, ns: 60 },
      // Widths that every WASM kernel of src/autodiff/wasm takes (multiples of 8).
      networks: { field: { hidden: [8, 8] }, propagator: { hidden: [16, 16, 16] } },
      collocation: { nx: 16, nodesPerBlock: 8, random: 64, resampleEvery: 20 },
      // 30 Adam steps still pass a resampling and a field update (step 20) after the warm start.
      warmStart: { type: 'reference', adamSteps: 20, learningRate: 0.01 },
      training: { adamSteps: 30, learningRate: 2e-3, fieldUpdateEvery: 20, fieldFitSteps: 20, logEvery: 5 },
    });
    setPlainOps(false);
    const fast = await trainRun({ config, backend: 'wasm' });
    setPlainOps(true);
    const plain = await trainRun({ config, backend: 'wasm' });
    setPlainOps(false);
    const totals = (r: typeof fast) => r.history.filter((h) => h.stage === 'adam' && Object.keys(h.terms).length > 0).map((h) => h.total); // the logged steps (every Adam step is in the history, the logged ones with their terms)
    expect(totals(fast).length).toBe(6);
    // float32 rounding (sigmoid-form tanh, summation order) compounded over 30 steps.
    expectClose(totals(fast), totals(plain), 1e-3, 'loss history');
    for (let i = 0; i < totals(fast).length; i++) expect(Math.abs(totals(fast)[i] / totals(plain)[i] - 1)).toBeLessThan(1e-3);
    expect(Math.abs(fast.metrics.errors.phiA.relativeL2 - plain.metrics.errors.phiA.relativeL2)).toBeLessThan(1e-3 * plain.metrics.errors.phiA.relativeL2 + 1e-6);
  });
});

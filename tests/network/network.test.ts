/**
 * The neural core on both the WASM and the plain-JS backend: feature jets, jet ops,
 * field and propagator networks (every derivative channel), parameter gradients, seeded
 * initialisation, flatten/named weights.
 *
 * Oracles: a float64 re-implementation of each forward pass (tests/network/reference64.ts)
 * differentiated by central finite differences; analytic derivatives of sin, cos, tanh,
 * exp. tfjs computes in float32, so channels are compared to a relative 2e-4 of their
 * scale (float32 rounding through a few layers is ~1e-6; a wrong propagation rule is an
 * O(1) error).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type * as TfModule from '@tensorflow/tfjs';
import { selectBackend, type BackendName, type Tf } from '../../src/autodiff/backend.js';
import { periodicFeatures, propagatorFeatures } from '../../src/network/features.js';
import { FieldNet } from '../../src/network/field-net.js';
import { concatRows, fastTanh, gatherRowsOp, Jet, matMulFast, denseOp } from '../../src/autodiff/jet.js';
import { PropagatorNet } from '../../src/network/propagator-net.js';
import { ParameterSet } from '../../src/autodiff/parameters.js';
import { fieldNetworkSchema, propagatorNetworkSchema } from '../../src/io/schemas/network-schema.js';
import { fd, features64, logQ64, mlp64, readMlp } from './reference64.js';
import { expectClose } from '../helpers/expect-close.js';

const L = 3.2; // cell length in Rg (about the lamellar period at the mean-field ODT, 2π/q* ≈ 3.23 Rg: Leibler 1980)
const F = 0.4; // block junction of an A0.4-B0.6 diblock

function arr(t: TfModule.Tensor | null, rows: number, cols: number): Float64Array {
  if (!t) return new Float64Array(rows * cols);
  const d = Float64Array.from(t.dataSync());
  if (t.shape[0] === rows && (t.shape[1] ?? 1) === cols) return d;
  // Broadcast channel ([1, cols] or [rows, 1]).
  const out = new Float64Array(rows * cols);
  for (let i = 0; i < rows; i++) for (let j = 0; j < cols; j++) out[i * cols + j] = d[(t.shape[0] === 1 ? 0 : i) * (t.shape[1] === 1 ? 1 : cols) + (t.shape[1] === 1 ? 0 : j)];
  return out;
}

/** Sample points: x over more than one period (periodicity), s away from 0, F, 1 by more than the FD steps. */
function samplePoints(n: number, seed: number): { x: number[]; s: number[] } {
  let r = seed;
  const rnd = () => (r = (Math.imul(r, 1664525) + 1013904223) >>> 0) / 2 ** 32;
  const x: number[] = [];
  const s: number[] = [];
  for (let i = 0; i < n; i++) {
    x.push(-L + 3 * L * rnd());
    let si = 0.01 + 0.98 * rnd();
    if (Math.abs(si - F) < 0.01) si += 0.02;
    s.push(si);
  }
  return { x, s };
}

describe.each(['cpu', 'wasm'] as BackendName[])('neural core on the %s backend', (kind) => {
  let tf: Tf;
  beforeAll(async () => {
    const h = await selectBackend(kind);
    tf = h.tf;
    expect(h.backend).toBe(kind);
    expect(h.tfjsVersion).toBe('4.22.0');
  });

  it('periodic feature jets match the analytic sin/cos derivatives and finite differences', () => {
    // Dong & Ni 2021 features; derivatives: d/dx sin(kx) = k cos(kx), d²/dx² = −k² sin(kx).
    const x = [-1.3, 0, 0.7, 2.9, 5.5];
    const M = 3;
    tf.tidy(() => {
      const j = periodicFeatures(tf, x, L, M);
      expect(j.ds).toBeNull();
      const v = arr(j.v, x.length, 2 * M);
      const dx = arr(j.dx, x.length, 2 * M);
      const dxx = arr(j.dxx, x.length, 2 * M);
      const ev: number[] = [];
      const edx: number[] = [];
      const edxx: number[] = [];
      for (const xi of x) {
        for (let c = 0; c < 2 * M; c++) {
          const g = (t: number) => features64(t, L, M)[c];
          const { d1, d2 } = fd(g, xi);
          ev.push(g(xi));
          edx.push(d1);
          edxx.push(d2);
        }
      }
      expectClose(v, ev, 1e-6, 'features');
      expectClose(dx, edx, 1e-5, 'features ∂x');
      expectClose(dxx, edxx, 1e-5, 'features ∂xx');
      // Contour column σ = (s − a)/Δ with ∂σ/∂s = 1/Δ.
      const p = propagatorFeatures(tf, x, [0.5, 0.6, 0.7, 0.8, 0.9], L, M, { start: 0.4, length: 0.6 });
      const pv = arr(p.v, x.length, 2 * M + 1);
      expect(pv[2 * M]).toBeCloseTo((0.5 - 0.4) / 0.6, 6);
      expect(arr(p.ds, 1, 2 * M + 1)[2 * M]).toBeCloseTo(1 / 0.6, 6);
      expect(arr(p.dx, x.length, 2 * M + 1)[2 * M]).toBe(0);
    });
  });

  it('fast forms equal the straightforward tfjs ops in value and gradient', () => {
    tf.tidy(() => {
      const z = tf.tensor2d([[-3, -0.5, 0, 0.2, 1.7, 6]]);
      // tanh(z) = 2σ(2z) − 1 (identity), gradient 1 − tanh².
      expectClose(fastTanh(tf, z).dataSync(), tf.tanh(z).dataSync(), 2e-7, 'fastTanh');
      const gFast = tf.grad((t: TfModule.Tensor) => tf.sum(tf.mul(fastTanh(tf, t), t)))(z);
      const gRef = tf.grad((t: TfModule.Tensor) => tf.sum(tf.mul(tf.tanh(t), t)))(z);
      expectClose(gFast.dataSync(), gRef.dataSync(), 1e-6, 'fastTanh gradient');
      // Dense layer with explicit-transpose gradient against tf.matMul's own gradient.
      const a = tf.tensor2d([[0.1, -0.4, 0.9], [1.2, 0.3, -0.7]]);
      const w = tf.tensor2d([[0.5, -1], [0.25, 0.75], [-0.3, 0.2]]);
      const b = tf.tensor1d([0.05, -0.1]);
      const c = tf.tensor2d([[1, -2], [0.5, 3]]);
      const fast = tf.grads((aa: TfModule.Tensor, ww: TfModule.Tensor, bb: TfModule.Tensor) => tf.sum(tf.mul(denseOp(tf, aa, ww, bb), c)))([a, w, b]);
      const ref = tf.grads((aa: TfModule.Tensor, ww: TfModule.Tensor, bb: TfModule.Tensor) => tf.sum(tf.mul(tf.add(tf.matMul(aa as TfModule.Tensor2D, ww as TfModule.Tensor2D), bb), c)))([a, w, b]);
      for (let i = 0; i < 3; i++) expectClose(fast[i].dataSync(), ref[i].dataSync(), 1e-6, `dense gradient ${i}`);
      const fm = tf.grads((aa: TfModule.Tensor, ww: TfModule.Tensor) => tf.sum(tf.mul(matMulFast(tf, aa, ww), c)))([a, w]);
      for (let i = 0; i < 2; i++) expectClose(fm[i].dataSync(), ref[i].dataSync(), 1e-6, `matMul gradient ${i}`);
      // Gather with repeated rows: d/da_j Σ_r c_r·a[idx_r] = Σ_{r: idx_r = j} c_r (linearity).
      const src = tf.tensor2d([[1], [2], [3]]);
      const idx = [2, 0, 2, 2, 1];
      const cw = [0.5, -1, 2, 4, 8];
      const gg = tf.grad((t: TfModule.Tensor) => tf.sum(tf.mul(gatherRowsOp(tf, t, tf.tensor1d(idx, 'int32')), tf.tensor2d(cw, [5, 1]))))(src);
      expectClose(gg.dataSync(), [-1, 8, 0.5 + 2 + 4], 1e-7, 'gather gradient');
    });
  });

  it('every jet op propagates ∂x, ∂xx, ∂s as finite differences of the composed function say', () => {
    // Inputs a(x, s) = x s + x², b(x, s) = sin(x) − s (channels written by hand), combined
    // by every op; the same expression is evaluated in float64 and differenced.
    const pts = [
      [0.3, 0.2],
      [-0.8, 0.7],
      [1.1, 0.45],
    ];
    const expr64 = (x: number, s: number) => {
      const a = x * s + x * x;
      const b = Math.sin(x) - s;
      const t = Math.tanh(a * b + 0.3);
      const e = Math.exp(0.5 * (a - b));
      const w = [0.7 * t + -0.2 * e, 1.5 * Math.sin(a) + Math.cos(b) * 0.4];
      return [w[0] * w[1] - (-a) + b * b, w[1] + 2];
    };
    tf.tidy(() => {
      const x = pts.map((p) => p[0]);
      const s = pts.map((p) => p[1]);
      const col = (v: number[]) => tf.tensor2d(v, [v.length, 1]);
      const a = new Jet(tf, col(x.map((xi, i) => xi * s[i] + xi * xi)), col(x.map((xi, i) => s[i] + 2 * xi)), col(x.map(() => 2)), col(x));
      const b = new Jet(tf, col(x.map((xi, i) => Math.sin(xi) - s[i])), col(x.map((xi) => Math.cos(xi))), col(x.map((xi) => -Math.sin(xi))), tf.tensor2d([[-1]]));
      const t = a.mul(b).addConst(0.3).tanh();
      const e = a.sub(b).scale(0.5).exp();
      const tw = concatRows([t, e]); // stack then split again by rows through gather
      const n = pts.length;
      const t2 = tw.gatherRows(tf.tensor1d([...Array(n).keys()], 'int32'));
      const e2 = tw.gatherRows(tf.tensor1d([...Array(n).keys()].map((i) => i + n), 'int32'));
      const te = new Jet(tf, tf.concat([t2.v, e2.v], 1), tf.concat([t2.dx!, e2.dx!], 1), tf.concat([t2.dxx!, e2.dxx!], 1), tf.concat([t2.ds!, e2.ds!], 1));
      const mix = te.matMul(tf.tensor2d([[0.7], [-0.2]]));
      const second = a.sin().scale(1.5).add(b.cos().scale(tf.tensor2d([[0.4]])));
      const w = new Jet(tf, tf.concat([mix.v, second.v], 1), tf.concat([mix.dx!, second.dx!], 1), tf.concat([mix.dxx!, second.dxx!], 1), tf.concat([mix.ds!, second.ds!], 1));
      const w0 = w.columns(0, 1);
      const w1 = w.columns(1, 1);
      const out0 = w0.mul(w1).sub(a.neg()).add(b.square());
      const out1 = w1.addConst(2);
      for (const [k, out] of [out0, out1].entries()) {
        const ev: number[] = [];
        const edx: number[] = [];
        const edxx: number[] = [];
        const eds: number[] = [];
        for (const [xi, si] of pts) {
          ev.push(expr64(xi, si)[k]);
          const gx = fd((q) => expr64(q, si)[k], xi);
          edx.push(gx.d1);
          edxx.push(gx.d2);
          eds.push(fd((q) => expr64(xi, q)[k], si).d1);
        }
        expectClose(arr(out.v, n, 1), ev, 2e-5, `op chain ${k} value`);
        expectClose(arr(out.dx, n, 1), edx, 2e-5, `op chain ${k} ∂x`);
        expectClose(arr(out.dxx, n, 1), edxx, 2e-5, `op chain ${k} ∂xx`);
        expectClose(arr(out.ds, n, 1), eds, 2e-5, `op chain ${k} ∂s`);
      }
    });
  });

  it('field network: values, ∂x, ∂xx against the float64 forward pass; exactly periodic', () => {
    for (const activation of ['tanh', 'sin'] as const) {
      const cfg = fieldNetworkSchema.parse({ hidden: [16, 16], activation, fourierModes: 3, seed: 7 });
      const net = new FieldNet(tf, cfg, { period: L, outputs: 2 });
      const ref = readMlp(net.parameters.namedWeights(), 'field');
      const { x } = samplePoints(40, 11);
      const feats = net.features(x);
      tf.tidy(() => {
        const w = net.forward(feats);
        expect(w.ds).toBeNull();
        expect(w.v.shape).toEqual([x.length, 2]);
        const ev: number[] = [];
        const edx: number[] = [];
        const edxx: number[] = [];
        for (const xi of x) {
          for (let c = 0; c < 2; c++) {
            const g = (t: number) => mlp64(ref, activation, features64(t, L, 3))[c];
            const d = fd(g, xi);
            ev.push(g(xi));
            edx.push(d.d1);
            edxx.push(d.d2);
          }
        }
        expectClose(arr(w.v, x.length, 2), ev, 2e-5, `${activation} field value`);
        expectClose(arr(w.dx, x.length, 2), edx, 2e-4, `${activation} field ∂x`);
        expectClose(arr(w.dxx, x.length, 2), edxx, 2e-4, `${activation} field ∂xx`);
        // Exact periodicity (Dong & Ni): w(x + L) = w(x) up to float32 rounding of the features.
        const shifted = net.features(x.map((xi) => xi + L), false);
        expectClose(arr(net.forward(shifted).v, x.length, 2), arr(w.v, x.length, 2), 1e-5, 'periodicity');
        shifted.dispose();
        // Value-only forward (no derivative channels) gives the same values.
        const vOnly = net.features(x, false);
        const wv = net.forward(vOnly);
        expect(wv.dx).toBeNull();
        expectClose(arr(wv.v, x.length, 2), arr(w.v, x.length, 2), 1e-7, 'value-only forward');
        vOnly.dispose();
      });
      feats.dispose();
      net.dispose();
    }
  });

  for (const pieces of ['single', 'per-block'] as const) {
    it(`propagator network (${pieces}): u = ln q and q channels against the float64 forward pass`, () => {
      const cfg = propagatorNetworkSchema.parse({ hidden: [16, 16], fourierModes: 3, seed: 3, pieces });
      const net = new PropagatorNet(tf, cfg, { period: L, blocks: [0, F, 1] });
      const named = net.parameters.namedWeights();
      const refPieces = net.pieces.map((_, k) => readMlp(named, `propagator/piece${k}`));
      const bounds = pieces === 'single' ? [0, 1] : [0, F, 1];
      const { x, s } = samplePoints(48, 5); // unsorted in s: exercises the re-ordering path
      const pts = net.prepare(x, s);
      const u64 = (xi: number, si: number) => logQ64(refPieces, bounds, 'tanh', L, 3, xi, si)[0];
      tf.tidy(() => {
        const u = net.logQ(pts);
        const n = x.length;
        const ev: number[] = [];
        const edx: number[] = [];
        const edxx: number[] = [];
        const eds: number[] = [];
        for (let i = 0; i < n; i++) {
          ev.push(u64(x[i], s[i]));
          const dx = fd((t) => u64(t, s[i]), x[i]);
          edx.push(dx.d1);
          edxx.push(dx.d2);
          eds.push(fd((t) => u64(x[i], t), s[i]).d1);
        }
        expectClose(arr(u.v, n, 1), ev, 2e-5, 'u');
        expectClose(arr(u.dx, n, 1), edx, 2e-4, 'u ∂x');
        expectClose(arr(u.dxx, n, 1), edxx, 2e-4, 'u ∂xx');
        expectClose(arr(u.ds, n, 1), eds, 2e-4, 'u ∂s');
        // q = exp(u): ∂x q = q u_x, ∂xx q = q(u_xx + u_x²), ∂s q = q u_s (chain rule), here
        // checked against finite differences of exp(u64).
        const q = net.q(pts);
        const q64 = (xi: number, si: number) => Math.exp(u64(xi, si));
        expectClose(arr(q.v, n, 1), ev.map(Math.exp), 2e-5, 'q');
        expectClose(arr(q.dxx, n, 1), x.map((xi, i) => fd((t) => q64(t, s[i]), xi).d2), 2e-4, 'q ∂xx');
        expectClose(arr(q.ds, n, 1), x.map((xi, i) => fd((t) => q64(xi, t), s[i]).d1), 2e-4, 'q ∂s');
      });
      pts.dispose();
      net.dispose();
    });
  }

  it('propagator: q(x, 0) = 1 exactly, u continuous at the junction, ∂s u free to jump there', () => {
    const cfg = propagatorNetworkSchema.parse({ hidden: [16, 16], fourierModes: 2, seed: 9, pieces: 'per-block' });
    const net = new PropagatorNet(tf, cfg, { period: L, blocks: [0, F, 1] });
    const nx = 16;
    const xg = Array.from({ length: nx }, (_, i) => (i * L) / nx);
    const d = 1e-3;
    // Rows: s = 0, s = F − d (block A), s = F (block B), s = F + d (block B); grid x repeats.
    const levels = [0, F - d, F, F + d];
    const x = levels.flatMap(() => xg);
    const s = levels.flatMap((sv) => xg.map(() => sv));
    const pts = net.prepare(x, s);
    tf.tidy(() => {
      const u = net.logQ(pts);
      const v = arr(u.v, x.length, 1);
      const us = arr(u.ds, x.length, 1);
      const q = arr(net.q(pts).v, x.length, 1);
      for (let i = 0; i < nx; i++) {
        // Hard initial condition: u = 0·n = 0 and q = exp(0) = 1 with no rounding at all.
        expect(v[i] === 0).toBe(true); // (±0: 0·n carries the sign of n)
        expect(q[i]).toBe(1);
        // Continuity: one-sided Taylor steps from both blocks reach the junction value,
        // u(F) = u(F − d) + d u_s(F − d) + O(d²) and u(F) = u(F + d) − d u_s(F + d) + O(d²).
        const uL = v[nx + i];
        const uJ = v[2 * nx + i];
        const uR = v[3 * nx + i];
        expect(Math.abs(uL + d * us[nx + i] - uJ)).toBeLessThan(2e-5);
        expect(Math.abs(uR - d * us[3 * nx + i] - uJ)).toBeLessThan(2e-5);
      }
      // The two blocks' networks are independent, so ∂s u differs across the junction
      // (a check that the pieces are really separate: a single smooth net would not jump).
      let jump = 0;
      for (let i = 0; i < nx; i++) jump = Math.max(jump, Math.abs(us[2 * nx + i] - us[nx + i]));
      expect(jump).toBeGreaterThan(1e-2);
    });
    pts.dispose();
    net.dispose();
  });

  it('parameter gradients of mean((∂s u − ∂xx u)² + (∂x u)²) match finite differences of the float64 loss', () => {
    // Tensor-product collocation grid (x repeats across s levels: junction gather path).
    const cfg = propagatorNetworkSchema.parse({ hidden: [12, 12], fourierModes: 2, seed: 21, pieces: 'per-block' });
    const net = new PropagatorNet(tf, cfg, { period: L, blocks: [0, F, 1] });
    const nx = 8;
    const sLevels = [0.1, 0.3, 0.5, 0.7, 0.9];
    const x = sLevels.flatMap(() => Array.from({ length: nx }, (_, i) => (i * L) / nx + 0.05));
    const s = sLevels.flatMap((sv) => Array.from({ length: nx }, () => sv));
    const pts = net.prepare(x, s);
    const vars = net.parameters.variables();
    const { grads } = tf.variableGrads(() => {
      const u = net.logQ(pts);
      const r = tf.sub(u.ds!, u.dxx!);
      return tf.add(tf.mean(tf.square(r)), tf.mean(tf.square(u.dx!))) as TfModule.Scalar;
    }, vars);
    const g = net.parameters.flattenGradients(grads);
    Object.values(grads).forEach((t) => t.dispose());

    const theta = net.parameters.flatten();
    const entries = net.parameters.entries;
    const offsets: Record<string, number> = {};
    let o = 0;
    for (const e of entries) {
      offsets[e.name] = o;
      o += e.variable.size;
    }
    const loss64 = (th: Float64Array): number => {
      const pieces = [0, 1].map((k) =>
        [0, 1, 2].map((l) => {
          const ko = offsets[`propagator/piece${k}/layer${l}/kernel`];
          const bo = offsets[`propagator/piece${k}/layer${l}/bias`];
          const kv = entries.find((e) => e.name === `propagator/piece${k}/layer${l}/kernel`)!.variable;
          return { kernel: th.subarray(ko, ko + kv.size), bias: th.subarray(bo, bo + kv.shape[1]), fanIn: kv.shape[0], fanOut: kv.shape[1] };
        }),
      );
      const u = (xi: number, si: number) => logQ64(pieces, [0, F, 1], 'tanh', L, 2, xi, si)[0];
      let acc = 0;
      for (let i = 0; i < x.length; i++) {
        const dx = fd((t) => u(t, s[i]), x[i], 1e-5, 1e-3);
        const ds = fd((t) => u(x[i], t), s[i], 1e-5, 1e-3).d1;
        acc += (ds - dx.d2) ** 2 + dx.d1 ** 2;
      }
      return acc / x.length;
    };
    // Parameters of both pieces (piece 0 also reaches block B through the junction term),
    // kernels of the first and last layer and a bias.
    const picks = [
      offsets['propagator/piece0/layer0/kernel'] + 3,
      offsets['propagator/piece0/layer2/kernel'] + 5,
      offsets['propagator/piece0/layer1/bias'] + 2,
      offsets['propagator/piece1/layer0/kernel'] + 7,
      offsets['propagator/piece1/layer1/kernel'] + 20,
      offsets['propagator/piece1/layer2/bias'],
    ];
    const h = 1e-4;
    for (const p of picks) {
      const tp = Float64Array.from(theta);
      const tm = Float64Array.from(theta);
      tp[p] += h;
      tm[p] -= h;
      const fdGrad = (loss64(tp) - loss64(tm)) / (2 * h);
      expect(Math.abs(g[p] - fdGrad), `parameter ${p}: tfjs ${g[p]}, FD ${fdGrad}`).toBeLessThan(2e-3 * Math.max(1, Math.abs(fdGrad)));
    }
    // The loss is not flat in these parameters (so the comparison means something).
    expect(Math.max(...picks.map((p) => Math.abs(g[p])))).toBeGreaterThan(1e-3);
    pts.dispose();
    net.dispose();
  });

  it('seeded initialisation repeats exactly; Glorot bounds hold; pieces differ', () => {
    const cfg = propagatorNetworkSchema.parse({ hidden: [32, 32], seed: 42 });
    const a = new PropagatorNet(tf, cfg, { period: L, blocks: [0, F, 1] });
    const b = new PropagatorNet(tf, cfg, { period: L, blocks: [0, F, 1] });
    const c = new PropagatorNet(tf, { ...cfg, seed: 43 }, { period: L, blocks: [0, F, 1] });
    const fa = a.parameters.flatten();
    expect(Array.from(b.parameters.flatten())).toEqual(Array.from(fa));
    expect(Array.from(c.parameters.flatten())).not.toEqual(Array.from(fa));
    const k0 = a.parameters.entries.find((e) => e.name === 'propagator/piece0/layer1/kernel')!.variable.dataSync();
    const k1 = a.parameters.entries.find((e) => e.name === 'propagator/piece1/layer1/kernel')!.variable.dataSync();
    expect(Array.from(k0)).not.toEqual(Array.from(k1));
    // Glorot & Bengio 2010: U(−a, a), a = sqrt(6/(32 + 32)), variance a²/3. 1024 samples:
    // sample variance within 15% (its relative s.d. is ~ 0.9/√1024 ≈ 3%).
    const bound = Math.sqrt(6 / 64);
    let m2 = 0;
    for (const v of k0) {
      expect(Math.abs(v)).toBeLessThanOrEqual(bound);
      m2 += v * v;
    }
    expect(m2 / k0.length).toBeGreaterThan(0.85 * (bound * bound) / 3);
    expect(m2 / k0.length).toBeLessThan(1.15 * (bound * bound) / 3);
    const bias = a.parameters.entries.find((e) => e.name === 'propagator/piece0/layer0/bias')!.variable.dataSync();
    expect(Array.from(bias).every((v) => v === 0)).toBe(true);
    for (const n of [a, b, c]) n.dispose();
  });

  it('flatten/unflatten, gradient flattening order and named weights round-trip', () => {
    const cfg = fieldNetworkSchema.parse({ hidden: [8], seed: 1 });
    const a = new FieldNet(tf, cfg, { period: L, outputs: 2 });
    const b = new FieldNet(tf, { ...cfg, seed: 2 }, { period: L, outputs: 2 });
    const theta = a.parameters.flatten();
    expect(theta.length).toBe(6 * 8 + 8 + 8 * 2 + 2);
    const moved = theta.map((v, i) => v + 0.001 * (i % 7));
    a.parameters.unflatten(moved);
    expectClose(a.parameters.flatten(), moved, 1e-7, 'unflatten');
    // Gradient of Σ_v Σ c·θ is c: flattenGradients must put it where flatten puts θ.
    const vars = a.parameters.variables();
    const coeff = vars.map((v, k) => tf.tensor(Float32Array.from({ length: v.size }, (_, i) => k * 100 + i), v.shape));
    const { grads } = tf.variableGrads(() => tf.addN(vars.map((v, k) => tf.sum(tf.mul(v, coeff[k])))) as TfModule.Scalar, vars);
    const g = a.parameters.flattenGradients(grads);
    const expected = Float64Array.from(coeff.flatMap((c) => Array.from(c.dataSync())));
    expect(Array.from(g)).toEqual(Array.from(expected));
    coeff.forEach((c) => c.dispose());
    Object.values(grads).forEach((t) => t.dispose());
    // Named weights: b takes a's weights and then computes the same field.
    b.parameters.loadNamedWeights(a.parameters.namedWeights());
    const feats = a.features([0.1, 1.7, 2.5]);
    tf.tidy(() => expectClose(b.forward(feats).dxx!.dataSync(), a.forward(feats).dxx!.dataSync(), 0, 'loaded weights'));
    feats.dispose();
    expect(() => b.parameters.loadNamedWeights(a.parameters.namedWeights().slice(1))).toThrow(/lacks weights: field\/layer0\/kernel/);
    const wrong = tf.zeros([3, 3]);
    expect(() => b.parameters.loadNamedWeights(a.parameters.namedWeights().map((w, i) => (i === 0 ? { name: w.name, tensor: wrong } : w)))).toThrow(/shape/);
    wrong.dispose();
    // Joined sets (field + propagator) keep both orders.
    const p = new PropagatorNet(tf, propagatorNetworkSchema.parse({ hidden: [4] }), { period: L, blocks: [0, 1] });
    const joint = ParameterSet.join(a.parameters, p.parameters);
    expect(joint.size).toBe(a.parameters.size + p.parameters.size);
    expect(Array.from(joint.flatten().subarray(0, a.parameters.size))).toEqual(Array.from(a.parameters.flatten()));
    for (const n of [a, b, p]) n.dispose();
  });

  it('does not leak tensors across a forward + gradient step', () => {
    const net = new PropagatorNet(tf, propagatorNetworkSchema.parse({ hidden: [8, 8] }), { period: L, blocks: [0, F, 1] });
    const { x, s } = samplePoints(32, 2);
    const pts = net.prepare(x, s);
    const step = () =>
      tf.tidy(() => {
        const { value, grads } = tf.variableGrads(() => tf.mean(tf.square(net.logQ(pts).dxx!)) as TfModule.Scalar, net.parameters.variables());
        net.parameters.flattenGradients(grads);
        return value.dataSync()[0];
      });
    step();
    const before = tf.memory().numTensors;
    step();
    step();
    expect(tf.memory().numTensors).toBe(before);
    pts.dispose();
    net.dispose();
  });
});

describe('backend selection', () => {
  let nativeInstalled = true;
  beforeAll(async () => {
    try {
      await import('@tensorflow/tfjs-node' as string);
    } catch {
      nativeInstalled = false;
    }
  });
  afterAll(async () => {
    await selectBackend('cpu');
  });

  it("'native' fails with a message naming @tensorflow/tfjs-node when it is not installed", async () => {
    if (nativeInstalled) return; // nothing to check on a machine that has it
    await expect(selectBackend('native')).rejects.toThrow(/@tensorflow\/tfjs-node.*could not be loaded.*"wasm" or "cpu"/);
  });

  it("'auto' falls back to wasm and says why native was skipped", async () => {
    const h = await selectBackend('auto');
    if (nativeInstalled) {
      expect(h.backend).toBe('native');
      return;
    }
    expect(h.backend).toBe('wasm');
    expect(h.tf.getBackend()).toBe('wasm');
    expect(h.skipped.join(' ')).toMatch(/^native: /);
  });
});

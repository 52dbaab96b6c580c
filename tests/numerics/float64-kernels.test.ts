import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { cholesky } from '../../src/numerics/cholesky.js';
import { float64Kernels, loadFloat64Kernels, setFloat64Kernels } from '../../src/numerics/float64-kernels.js';
import type { Float64Kernels } from '../../src/numerics/float64-kernels.js';
import { groupedNormalEquations, groupJacobianEntry } from '../../src/numerics/grouped-normal-equations.js';
import { Xorshift128 } from '../../src/numerics/random.js';

// The f64x2 kernels (normal matrix over row chunks, Cholesky's four-row blocks) against plain
// triple loops written here (the definitions of JᵀJ and of L Lᵀ = A; common practice, no
// source), and against the JS forms they replace: the same order of additions, so the same
// bits.
let kernels: Float64Kernels | null = null;
beforeAll(async () => {
  kernels = await loadFloat64Kernels();
});
afterAll(() => setFloat64Kernels(kernels));

function withKernels<T>(on: boolean, f: () => T): T {
  setFloat64Kernels(on ? kernels : null);
  try {
    return f();
  } finally {
    setFloat64Kernels(kernels);
  }
}

describe('float64 kernels', () => {
  it('load on this Node (WebAssembly SIMD)', () => {
    expect(kernels).not.toBeNull();
    expect(float64Kernels()).toBe(kernels);
  });

  // Shapes that exercise the padding to 8 columns, odd widths, a last partial chunk of rows,
  // and a factored block beside the own columns.
  for (const { k, m, n } of [
    { k: 8, m: 3, n: 8 },
    { k: 37, m: 150, n: 40 },
    { k: 131, m: 200, n: 140 },
  ]) {
    it(`JᵀJ and Jᵀr of a ${m} × ${k} group equal a triple loop and the JS form bit for bit`, () => {
      const rng = new Xorshift128(k + m);
      const columns = Int32Array.from({ length: k }, (_, i) => i + (n - k));
      const J = Float64Array.from({ length: m * k }, () => rng.next() - 0.5);
      const r = Float64Array.from({ length: m }, () => rng.next() - 0.5);
      const groups = [{ columns, J, r }];
      const wasm = withKernels(true, () => groupedNormalEquations(n, groups));
      const js = withKernels(false, () => groupedNormalEquations(n, groups));
      expect(Array.from(wasm.A)).toEqual(Array.from(js.A));
      expect(Array.from(wasm.g)).toEqual(Array.from(js.g));
      for (let a = 0; a < k; a++) {
        let ga = 0;
        for (let i = 0; i < m; i++) ga += J[i * k + a] * r[i];
        expect(wasm.g[columns[a]]).toBeCloseTo(ga, 12);
        for (let b = 0; b < k; b++) {
          let s = 0;
          for (let i = 0; i < m; i++) s += J[i * k + a] * J[i * k + b];
          expect(wasm.A[columns[a] * n + columns[b]]).toBeCloseTo(b <= a ? s : 0, 12);
        }
      }
    });
  }

  for (const { k, kf, t, m } of [
    { k: 9, kf: 8, t: 4, m: 20 },
    { k: 41, kf: 33, t: 12, m: 90 },
  ]) {
    it(`a group with ${kf} factored columns through ${t} intermediates: the dense JᵀJ by a triple loop, and the JS form bit for bit`, () => {
      const rng = new Xorshift128(7 * k + kf);
      const n = kf + k + 3;
      // Factored columns first, then the group's own (global columns as the residual system has them).
      const fcols = Int32Array.from({ length: kf }, (_, i) => i + 1);
      const columns = Int32Array.from({ length: k }, (_, i) => i + kf + 2);
      const J = Float64Array.from({ length: m * k }, () => rng.next() - 0.5);
      const r = Float64Array.from({ length: m }, () => rng.next() - 0.5);
      // C mostly zero (two entries a row), as the junction channels make it.
      const C = new Float64Array(m * t);
      for (let i = 0; i < m; i++) {
        const u = (i * 3) % (t - 1);
        C[i * t + u] = rng.next() - 0.5;
        C[i * t + u + 1] = rng.next() - 0.5;
      }
      const E = Float64Array.from({ length: t * kf }, () => rng.next() - 0.5);
      const groups = [{ columns, J, r, factored: { columns: fcols, t, C, E } }];
      const wasm = withKernels(true, () => groupedNormalEquations(n, groups));
      const js = withKernels(false, () => groupedNormalEquations(n, groups));
      expect(Array.from(wasm.A)).toEqual(Array.from(js.A));
      expect(Array.from(wasm.g)).toEqual(Array.from(js.g));
      const dense = Array.from({ length: m }, (_, i) => Array.from({ length: n }, (_, c) => groupJacobianEntry(groups[0], i, c)));
      for (let a = 0; a < n; a++) {
        let ga = 0;
        for (let i = 0; i < m; i++) ga += dense[i][a] * r[i];
        expect(wasm.g[a]).toBeCloseTo(ga, 11);
        for (let b = 0; b <= a; b++) {
          let s = 0;
          for (let i = 0; i < m; i++) s += dense[i][a] * dense[i][b];
          expect(wasm.A[a * n + b]).toBeCloseTo(s, 11);
        }
      }
    });
  }

  for (const n of [8, 13, 64, 203]) {
    it(`Cholesky of a ${n} × ${n} SPD matrix: L Lᵀ = A by a triple loop, and the JS form's factor bit for bit`, () => {
      const rng = new Xorshift128(n);
      const B = Float64Array.from({ length: n * n }, () => rng.next() - 0.5);
      const A = new Float64Array(n * n);
      for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
        let s = i === j ? 0.1 : 0;
        for (let k = 0; k < n; k++) s += B[k * n + i] * B[k * n + j];
        A[i * n + j] = s;
      }
      const wasm = withKernels(true, () => cholesky(A, n));
      const js = withKernels(false, () => cholesky(A, n));
      expect(wasm.shift).toBe(0);
      expect(Array.from(wasm.L)).toEqual(Array.from(js.L));
      let worst = 0;
      for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
        let s = 0;
        for (let k = 0; k < n; k++) s += wasm.L[i * n + k] * wasm.L[j * n + k];
        worst = Math.max(worst, Math.abs(s - A[i * n + j]));
        if (j > i) expect(wasm.L[i * n + j]).toBe(0);
      }
      expect(worst).toBeLessThan(1e-10 * n);
    });
  }

  it('Cholesky with the kernel still shifts a semidefinite matrix as the JS form does', () => {
    const n = 12;
    const v = Float64Array.from({ length: n }, (_, i) => i + 1);
    const A = new Float64Array(n * n);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) A[i * n + j] = v[i] * v[j];
    const wasm = withKernels(true, () => cholesky(A, n));
    const js = withKernels(false, () => cholesky(A, n));
    expect(wasm.shift).toBeGreaterThan(0);
    expect(wasm.shift).toBe(js.shift);
    expect(Array.from(wasm.L)).toEqual(Array.from(js.L));
  });
});

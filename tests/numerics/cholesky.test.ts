import { describe, expect, it } from 'vitest';
import { cholesky, choleskySolve } from '../../src/numerics/cholesky.js';
import { solveDense } from '../../src/numerics/dense-solve.js';
import { Xorshift128 } from '../../src/numerics/random.js';

/** A = BᵀB + c·I for a random B: symmetric positive definite (common practice, no source). */
function randomSpd(n: number, seed: number, c = 0.1): Float64Array {
  const rng = new Xorshift128(seed);
  const B = Float64Array.from({ length: n * n }, () => 2 * rng.next() - 1);
  const A = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
    let s = i === j ? c : 0;
    for (let k = 0; k < n; k++) s += B[k * n + i] * B[k * n + j];
    A[i * n + j] = s;
  }
  return A;
}

describe('cholesky', () => {
  it('L Lᵀ reconstructs a random SPD matrix, L lower triangular with positive diagonal', () => {
    const n = 17;
    const A = randomSpd(n, 3);
    const { L, shift } = cholesky(A, n);
    expect(shift).toBe(0);
    for (let i = 0; i < n; i++) {
      expect(L[i * n + i]).toBeGreaterThan(0);
      for (let j = i + 1; j < n; j++) expect(L[i * n + j]).toBe(0);
      for (let j = 0; j < n; j++) {
        let s = 0;
        for (let k = 0; k < n; k++) s += L[i * n + k] * L[j * n + k];
        expect(Math.abs(s - A[i * n + j])).toBeLessThan(1e-12 * Math.max(1, Math.abs(A[i * n + j])));
      }
    }
  });

  it('solves A x = b as Gaussian elimination with partial pivoting does (independent method)', () => {
    const n = 23;
    const A = randomSpd(n, 11);
    const rng = new Xorshift128(5);
    const b = Float64Array.from({ length: n }, () => rng.next() - 0.5);
    const x = choleskySolve(cholesky(A, n), b);
    const rows = Array.from({ length: n }, (_, i) => A.slice(i * n, (i + 1) * n));
    const ref = solveDense(rows, b)!;
    for (let i = 0; i < n; i++) expect(Math.abs(x[i] - ref[i])).toBeLessThan(1e-9 * Math.max(1, Math.abs(ref[i])));
  });

  it('reads only the lower triangle', () => {
    const n = 6;
    const A = randomSpd(n, 2);
    const B = Float64Array.from(A);
    for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) B[i * n + j] = 1e6;
    const b = Float64Array.from({ length: n }, (_, i) => i + 1);
    const xa = choleskySolve(cholesky(A, n), b);
    const xb = choleskySolve(cholesky(B, n), b);
    for (let i = 0; i < n; i++) expect(xb[i]).toBe(xa[i]);
  });

  it('a semidefinite matrix (JᵀJ of rank 1) factorises with a small diagonal shift, reported', () => {
    const n = 4;
    const v = [1, 2, 3, 4];
    const A = Float64Array.from({ length: n * n }, (_, k) => v[Math.floor(k / n)] * v[k % n]);
    const f = cholesky(A, n);
    expect(f.shift).toBeGreaterThan(0);
    expect(f.shift).toBeLessThan(1e-6 * 16);
    // (A + τI) x = A v is solved by x = v − τ x ⇒ A x ≈ A v: the shifted solve still fits the range of A.
    const b = Float64Array.from(v, (_, i) => v.reduce((s, vj, j) => s + A[i * n + j] * vj, 0));
    const x = choleskySolve(f, b);
    for (let i = 0; i < n; i++) {
      const Ax = v.reduce((s, _, j) => s + A[i * n + j] * x[j], 0);
      expect(Math.abs(Ax - b[i])).toBeLessThan(1e-6 * Math.abs(b[i]));
    }
  });

  it('names what is wrong: a matrix with NaN does not factorise', () => {
    expect(() => cholesky(new Float64Array([Number.NaN, 0, 0, 1]), 2)).toThrow(/did not factorise/);
  });
});

describe('cholesky, the register-blocked rows', () => {
  it('gives the same factor as the plain dot-product form (Golub & Van Loan, Algorithm 4.2.1, written here), bit for bit', () => {
    for (const n of [1, 3, 4, 5, 8, 37, 66]) {
      const A = randomSpd(n, 40 + n);
      const L0 = new Float64Array(n * n);
      for (let i = 0; i < n; i++) {
        for (let j = 0; j <= i; j++) {
          let s = A[i * n + j];
          for (let k = 0; k < j; k++) s -= L0[i * n + k] * L0[j * n + k];
          L0[i * n + j] = i === j ? Math.sqrt(s) : s / L0[j * n + j];
        }
      }
      const { L, shift } = cholesky(A, n);
      expect(shift).toBe(0);
      for (let i = 0; i < n * n; i++) expect(L[i]).toBe(L0[i]);
    }
  });
});

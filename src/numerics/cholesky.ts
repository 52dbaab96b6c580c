/**
 * Cholesky factorisation A = L Lᵀ of a symmetric positive definite matrix in float64, and
 * the solve A x = b by forward then back substitution (Golub & Van Loan, "Matrix
 * Computations", 4th ed., Algorithm 4.2.1, the row-oriented (dot-product) form).
 *
 * Matrices are dense, row-major Float64Array of n·n; only the lower triangle of A is read.
 * When a pivot is not positive (A only semidefinite, or indefinite by round-off, as a
 * Gauss–Newton normal matrix JᵀJ often is), the factorisation is retried on A + τI with
 * τ = jitter·max|A_ii|, τ growing tenfold per retry: the usual diagonal-shift remedy
 * (Nocedal & Wright, "Numerical Optimization", 2nd ed., §3.4, "Modified Cholesky"), and
 * the caller is told the shift it got.
 */
import { float64Kernels } from './float64-kernels.js';
import type { Float64Kernels } from './float64-kernels.js';

export interface CholeskyFactor {
  n: number;
  /** Lower-triangular factor, row-major n·n (the upper triangle is zero). */
  L: Float64Array;
  /** Diagonal shift τ added to A before it factorised (0 when none was needed). */
  shift: number;
}

/**
 * Rows i0..i1−1 of L, each against every earlier row in turn (the plain dot-product form):
 * the diagonal block of a row block, and the rows left over at the end.
 */
function factorRows(A: Float64Array, L: Float64Array, n: number, shift: number, i0: number, i1: number, j0: number): boolean {
  for (let i = i0; i < i1; i++) {
    const ri = i * n;
    for (let j = j0; j <= i; j++) {
      const rj = j * n;
      let s = A[ri + j] + (i === j ? shift : 0);
      for (let k = 0; k < j; k++) s -= L[ri + k] * L[rj + k];
      if (i === j) {
        if (!(s > 0)) return false;
        L[ri + i] = Math.sqrt(s);
      } else {
        L[ri + j] = s / L[rj + j];
      }
    }
  }
  return true;
}

/**
 * L with L Lᵀ = A + shift·I, or null when a pivot is not positive. The same dot-product
 * form, with the rows taken four at a time against two earlier rows at a time (a register
 * block: each earlier row is read once per four rows, eight sums kept in registers), which
 * is about three times faster than one row at a time at n ≈ 800 (measured; the order of the
 * additions in every sum is unchanged, so the factor is the same to the last bit).
 */
function factorWithShift(A: Float64Array, n: number, shift: number): Float64Array | null {
  // With the f64x2 kernel (numerics/float64-kernels.ts: the same sums in the same order, lane by
  // lane, so the same factor to the last bit) A and L live in the kernels' memory and the
  // off-diagonal part of each four-row block runs there; factorRows does the 4 × 4 diagonal
  // blocks and the last rows in either case.
  const kernels = n >= 8 ? float64Kernels() : null;
  let Aw = A;
  let L: Float64Array;
  let offDiagonal: (i0: number) => void;
  if (kernels) {
    kernels.reset();
    const As = kernels.scratch(n * n);
    const Ls = kernels.scratch(n * n);
    const Ps = kernels.scratch(4 * n);
    Aw = kernels.view(As);
    Aw.set(A);
    L = kernels.view(Ls);
    offDiagonal = (i0) => kernels.cholRows4(As.offset, Ls.offset, Ps.offset, n, i0);
  } else {
    const Lj = (L = new Float64Array(n * n));
    offDiagonal = (i0) => offDiagonalRows4(A, Lj, n, i0);
  }
  let i0 = 0;
  for (; i0 + 3 < n; i0 += 4) {
    offDiagonal(i0);
    // The 4 × 4 diagonal block: its rows depend on each other, one at a time.
    if (!factorRows(Aw, L, n, shift, i0, i0 + 4, i0)) return null;
  }
  if (!factorRows(Aw, L, n, shift, i0, n, 0)) return null;
  // The kernels' memory is reused by the next call: the factor is copied out of it.
  return kernels ? L.slice() : L;
}

/** Rows i0 … i0+3 of L against the earlier rows 0 … i0−1, two of those at a time (the JS form of the kernel's chol_rows4). */
function offDiagonalRows4(A: Float64Array, L: Float64Array, n: number, i0: number): void {
  const r0 = i0 * n;
  const r1 = r0 + n;
  const r2 = r1 + n;
  const r3 = r2 + n;
  let j = 0;
  for (; j + 1 < i0; j += 2) {
    const rj = j * n;
    const rk = rj + n;
    let s0 = A[r0 + j];
    let s1 = A[r1 + j];
    let s2 = A[r2 + j];
    let s3 = A[r3 + j];
    let t0 = A[r0 + j + 1];
    let t1 = A[r1 + j + 1];
    let t2 = A[r2 + j + 1];
    let t3 = A[r3 + j + 1];
    for (let k = 0; k < j; k++) {
      const l = L[rj + k];
      const m = L[rk + k];
      const a0 = L[r0 + k];
      const a1 = L[r1 + k];
      const a2 = L[r2 + k];
      const a3 = L[r3 + k];
      s0 -= a0 * l;
      s1 -= a1 * l;
      s2 -= a2 * l;
      s3 -= a3 * l;
      t0 -= a0 * m;
      t1 -= a1 * m;
      t2 -= a2 * m;
      t3 -= a3 * m;
    }
    const d = L[rj + j];
    s0 /= d;
    s1 /= d;
    s2 /= d;
    s3 /= d;
    L[r0 + j] = s0;
    L[r1 + j] = s1;
    L[r2 + j] = s2;
    L[r3 + j] = s3;
    const lkj = L[rk + j];
    const e = L[rk + j + 1];
    L[r0 + j + 1] = (t0 - s0 * lkj) / e;
    L[r1 + j + 1] = (t1 - s1 * lkj) / e;
    L[r2 + j + 1] = (t2 - s2 * lkj) / e;
    L[r3 + j + 1] = (t3 - s3 * lkj) / e;
  }
  for (; j < i0; j++) {
    const rj = j * n;
    let s0 = A[r0 + j];
    let s1 = A[r1 + j];
    let s2 = A[r2 + j];
    let s3 = A[r3 + j];
    for (let k = 0; k < j; k++) {
      const l = L[rj + k];
      s0 -= L[r0 + k] * l;
      s1 -= L[r1 + k] * l;
      s2 -= L[r2 + k] * l;
      s3 -= L[r3 + k] * l;
    }
    const d = L[rj + j];
    L[r0 + j] = s0 / d;
    L[r1 + j] = s1 / d;
    L[r2 + j] = s2 / d;
    L[r3 + j] = s3 / d;
  }
}

export interface CholeskyOptions {
  /** First relative diagonal shift tried when A does not factorise (× max|A_ii|). */
  jitter?: number;
  /** Retries with a tenfold larger shift each. */
  maxRetries?: number;
}

/**
 * Factorise A (n·n, row-major, lower triangle read); with a diagonal shift when needed.
 * Throws a RangeError when no shift up to jitter·10^maxRetries makes it factorise
 * (non-finite entries, or a matrix far from positive definite).
 */
export function cholesky(A: Float64Array, n: number, options: CholeskyOptions = {}): CholeskyFactor {
  if (A.length !== n * n) throw new RangeError(`cholesky: matrix has ${A.length} entries, expected ${n}·${n}`);
  const plain = factorWithShift(A, n, 0);
  if (plain) return { n, L: plain, shift: 0 };
  let scale = 0;
  for (let i = 0; i < n; i++) scale = Math.max(scale, Math.abs(A[i * n + i]));
  if (!(scale > 0) || !Number.isFinite(scale)) scale = 1;
  let tau = (options.jitter ?? 1e-12) * scale;
  const retries = options.maxRetries ?? 10;
  for (let r = 0; r < retries; r++, tau *= 10) {
    const L = factorWithShift(A, n, tau);
    if (L) return { n, L, shift: tau };
  }
  throw new RangeError(`cholesky: the matrix did not factorise with a diagonal shift up to ${tau / 10}`);
}

/** x with L Lᵀ x = b. */
export function choleskySolve(f: CholeskyFactor, b: Float64Array): Float64Array {
  const { n, L } = f;
  if (b.length !== n) throw new RangeError(`choleskySolve: right-hand side has ${b.length} entries, expected ${n}`);
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let s = b[i];
    const ri = i * n;
    for (let k = 0; k < i; k++) s -= L[ri + k] * y[k];
    y[i] = s / L[ri + i];
  }
  const x = new Float64Array(n);
  for (let i = n - 1; i >= 0; i--) {
    let s = y[i];
    for (let k = i + 1; k < n; k++) s -= L[k * n + i] * x[k];
    x[i] = s / L[i * n + i];
  }
  return x;
}

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

export interface CholeskyFactor {
  n: number;
  /** Lower-triangular factor, row-major n·n (the upper triangle is zero). */
  L: Float64Array;
  /** Diagonal shift τ added to A before it factorised (0 when none was needed). */
  shift: number;
}

/** L with L Lᵀ = A + shift·I, or null when a pivot is not positive. */
function factorWithShift(A: Float64Array, n: number, shift: number): Float64Array | null {
  const L = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    const ri = i * n;
    for (let j = 0; j <= i; j++) {
      const rj = j * n;
      let s = A[ri + j] + (i === j ? shift : 0);
      for (let k = 0; k < j; k++) s -= L[ri + k] * L[rj + k];
      if (i === j) {
        if (!(s > 0)) return null;
        L[ri + i] = Math.sqrt(s);
      } else {
        L[ri + j] = s / L[rj + j];
      }
    }
  }
  return L;
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

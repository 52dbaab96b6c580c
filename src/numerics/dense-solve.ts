/** Small dense linear systems (Anderson mixing, least-squares fits). */

/** Gaussian elimination with partial pivoting; undefined when the matrix is (nearly) singular. */
export function solveDense(A: Float64Array[], b: Float64Array): Float64Array | undefined {
  const n = b.length;
  const M = A.map((row) => Float64Array.from(row));
  const r = Float64Array.from(b);
  let scale = 0;
  for (let i = 0; i < n; i++) scale = Math.max(scale, Math.abs(M[i][i]));
  if (!(scale > 0)) return undefined;
  for (let c = 0; c < n; c++) {
    let p = c;
    for (let i = c + 1; i < n; i++) if (Math.abs(M[i][c]) > Math.abs(M[p][c])) p = i;
    if (Math.abs(M[p][c]) < 1e-13 * scale) return undefined;
    [M[c], M[p]] = [M[p], M[c]];
    [r[c], r[p]] = [r[p], r[c]];
    for (let i = c + 1; i < n; i++) {
      const f = M[i][c] / M[c][c];
      if (f === 0) continue;
      for (let k = c; k < n; k++) M[i][k] -= f * M[c][k];
      r[i] -= f * r[c];
    }
  }
  const x = new Float64Array(n);
  for (let i = n - 1; i >= 0; i--) {
    let s = r[i];
    for (let k = i + 1; k < n; k++) s -= M[i][k] * x[k];
    x[i] = s / M[i][i];
  }
  return x;
}

/**
 * Weighted linear least squares by the normal equations: the coefficients c minimising
 * Σ_i weight_i (row_i · c − y_i)² for each right-hand side y (one matrix, several y);
 * undefined for a y whose normal matrix is (nearly) singular. `row(i, out)` fills row i
 * (p columns) of the design matrix.
 */
export function linearLeastSquares(rows: number, p: number, row: (i: number, out: Float64Array) => void, ys: readonly ArrayLike<number>[], weights?: ArrayLike<number>): (Float64Array | undefined)[] {
  const A = Array.from({ length: p }, () => new Float64Array(p));
  const b = ys.map(() => new Float64Array(p));
  const v = new Float64Array(p);
  for (let i = 0; i < rows; i++) {
    row(i, v);
    const wi = weights ? weights[i] : 1;
    for (let r = 0; r < p; r++) {
      for (let k = 0; k < ys.length; k++) b[k][r] += wi * v[r] * ys[k][i];
      for (let c = 0; c < p; c++) A[r][c] += wi * v[r] * v[c];
    }
  }
  return b.map((rhs) => solveDense(A, rhs));
}

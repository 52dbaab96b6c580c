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

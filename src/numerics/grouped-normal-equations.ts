/**
 * Gauss–Newton normal equations A = JᵀJ, g = Jᵀr from a Jacobian given in groups of rows,
 * each group touching only its own columns (a block-sparse J: the residuals of one
 * propagator network do not depend on another's parameters). Each group's product is
 * formed on its own compact columns and added into A, so a group of k columns costs
 * rows·k²/2 multiply-adds instead of rows·n²/2 (common practice, no source).
 * A is row-major n·n with only the lower triangle filled (what numerics/cholesky.ts reads).
 */

export interface ResidualGroup {
  /** Global column (parameter) indices of the group, strictly ascending. */
  columns: Int32Array;
  /** Row-major rows × columns.length. */
  J: Float64Array;
  /** The group's residuals, one per row. */
  r: Float64Array;
}

export function groupedNormalEquations(n: number, groups: readonly ResidualGroup[]): { A: Float64Array; g: Float64Array; cost: number } {
  const A = new Float64Array(n * n);
  const g = new Float64Array(n);
  let sumSq = 0;
  for (const grp of groups) {
    const k = grp.columns.length;
    const m = grp.r.length;
    if (grp.J.length !== m * k) throw new RangeError(`group has ${grp.J.length} Jacobian entries, expected ${m}·${k}`);
    // Columns of J as rows of Jᵀ (k × m), so each entry of G is a dot product kept in registers.
    const T = new Float64Array(k * m);
    for (let i = 0; i < m; i++) {
      const o = i * k;
      sumSq += grp.r[i] * grp.r[i];
      for (let a = 0; a < k; a++) T[a * m + i] = grp.J[o + a];
    }
    const G = new Float64Array(k * k);
    const gl = new Float64Array(k);
    for (let a = 0; a < k; a++) {
      const ta = a * m;
      let s = 0;
      for (let i = 0; i < m; i++) s += T[ta + i] * grp.r[i];
      gl[a] = s;
      let b = 0;
      for (; b + 3 <= a; b += 4) {
        const t0 = b * m;
        const t1 = t0 + m;
        const t2 = t1 + m;
        const t3 = t2 + m;
        let s0 = 0;
        let s1 = 0;
        let s2 = 0;
        let s3 = 0;
        for (let i = 0; i < m; i++) {
          const v = T[ta + i];
          s0 += v * T[t0 + i];
          s1 += v * T[t1 + i];
          s2 += v * T[t2 + i];
          s3 += v * T[t3 + i];
        }
        G[a * k + b] = s0;
        G[a * k + b + 1] = s1;
        G[a * k + b + 2] = s2;
        G[a * k + b + 3] = s3;
      }
      for (; b <= a; b++) {
        const tb = b * m;
        let s0 = 0;
        for (let i = 0; i < m; i++) s0 += T[ta + i] * T[tb + i];
        G[a * k + b] = s0;
      }
    }
    const c = grp.columns;
    for (let a = 0; a < k; a++) {
      g[c[a]] += gl[a];
      const ra = c[a] * n;
      for (let b = 0; b <= a; b++) A[ra + c[b]] += G[a * k + b];
    }
  }
  return { A, g, cost: 0.5 * sumSq };
}

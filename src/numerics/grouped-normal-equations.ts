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
    const G = new Float64Array(k * k);
    const gl = new Float64Array(k);
    for (let i = 0; i < m; i++) {
      const o = i * k;
      const ri = grp.r[i];
      sumSq += ri * ri;
      for (let a = 0; a < k; a++) {
        const ja = grp.J[o + a];
        if (ja === 0) continue;
        gl[a] += ja * ri;
        const ra = a * k;
        for (let b = 0; b <= a; b++) G[ra + b] += ja * grp.J[o + b];
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

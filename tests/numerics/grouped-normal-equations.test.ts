import { describe, expect, it } from 'vitest';
import { groupedNormalEquations } from '../../src/numerics/grouped-normal-equations.js';
import { Xorshift128 } from '../../src/numerics/random.js';

// JᵀJ and Jᵀr of a block-sparse J given in groups against the same products of the dense J,
// formed here by the definition (common practice, no source).
describe('groupedNormalEquations', () => {
  it('equals the dense JᵀJ and Jᵀr (lower triangle), for overlapping column groups', () => {
    const n = 11;
    const rng = new Xorshift128(4);
    const groups = [
      { columns: Int32Array.from([0, 1, 2, 7, 8]), rows: 6 },
      { columns: Int32Array.from([3, 4, 5, 6, 7, 8, 9, 10]), rows: 9 },
      { columns: Int32Array.from({ length: n }, (_, i) => i), rows: 4 },
    ].map(({ columns, rows }) => ({ columns, J: Float64Array.from({ length: rows * columns.length }, () => rng.next() - 0.5), r: Float64Array.from({ length: rows }, () => rng.next() - 0.5) }));
    const dense: number[][] = [];
    const r: number[] = [];
    for (const g of groups) {
      const k = g.columns.length;
      for (let i = 0; i < g.r.length; i++) {
        const row = new Array(n).fill(0);
        for (let c = 0; c < k; c++) row[g.columns[c]] = g.J[i * k + c];
        dense.push(row);
        r.push(g.r[i]);
      }
    }
    const { A, g, cost } = groupedNormalEquations(n, groups);
    for (let a = 0; a < n; a++) {
      const ga = dense.reduce((s, row, i) => s + row[a] * r[i], 0);
      expect(g[a]).toBeCloseTo(ga, 12);
      for (let b = 0; b < n; b++) {
        const ab = dense.reduce((s, row) => s + row[a] * row[b], 0);
        expect(A[a * n + b]).toBeCloseTo(b <= a ? ab : 0, 12);
      }
    }
    expect(cost).toBeCloseTo(0.5 * r.reduce((s, v) => s + v * v, 0), 12);
  });
});

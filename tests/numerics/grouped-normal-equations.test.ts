import { describe, expect, it } from 'vitest';
import { groupedNormalEquations, groupJacobianEntry, shiftedGroups } from '../../src/numerics/grouped-normal-equations.js';
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

describe('groupedNormalEquations, large groups (the chunked, register-blocked product)', () => {
  it('equals JᵀJ and Jᵀr by the definition for groups taller than one chunk and odd widths', () => {
    const rng = new Xorshift128(9);
    for (const [rows, k] of [
      [150, 13],
      [64, 8],
      [65, 2],
      [200, 1],
      [3, 31],
    ]) {
      const columns = Int32Array.from({ length: k }, (_, i) => 2 * i);
      const n = 2 * k;
      const J = Float64Array.from({ length: rows * k }, () => rng.next() - 0.5);
      const r = Float64Array.from({ length: rows }, () => rng.next() - 0.5);
      const { A, g } = groupedNormalEquations(n, [{ columns, J, r }]);
      for (let a = 0; a < k; a++) {
        let ga = 0;
        for (let i = 0; i < rows; i++) ga += J[i * k + a] * r[i];
        expect(g[2 * a]).toBeCloseTo(ga, 12);
        expect(g[2 * a + 1]).toBe(0);
        for (let b = 0; b < k; b++) {
          let ab = 0;
          for (let i = 0; i < rows; i++) ab += J[i * k + a] * J[i * k + b];
          expect(A[2 * a * n + 2 * b]).toBeCloseTo(b <= a ? ab : 0, 12);
          expect(A[2 * a * n + 2 * b + 1]).toBe(0);
        }
      }
    }
  });
});

/** A group with random own columns J and factored columns C·E, C with two non-zeros per row like the junction channels of one grid point. */
function randomFactoredGroup(rng: Xorshift128, m: number, t: number, own: Int32Array, fcols: Int32Array) {
  const J = Float64Array.from({ length: m * own.length }, () => rng.next() - 0.5);
  const r = Float64Array.from({ length: m }, () => rng.next() - 0.5);
  const C = new Float64Array(m * t);
  for (let i = 0; i < m; i++) {
    const u = i % (t / 2);
    C[i * t + 2 * u] = rng.next() - 0.5;
    C[i * t + 2 * u + 1] = rng.next() - 0.5;
  }
  const E = Float64Array.from({ length: t * fcols.length }, () => rng.next() - 0.5);
  return { columns: own, J, r, factored: { columns: fcols, t, C, E } };
}

describe('groupedNormalEquations, factored columns (Jacobian C·E)', () => {
  it('equals JᵀJ and Jᵀr of the expanded dense J (C·E multiplied out here), C mostly zero', () => {
    const rng = new Xorshift128(21);
    const m = 90;
    const t = 6;
    const own = Int32Array.from([1, 4, 5, 8, 9, 10, 12]);
    const fcols = Int32Array.from([0, 2, 3, 6, 7, 11]);
    const n = 13;
    const k = own.length;
    const kf = fcols.length;
    const grp = randomFactoredGroup(rng, m, t, own, fcols);
    const { J, r, factored: { C, E } } = grp;
    const dense: number[][] = [];
    for (let i = 0; i < m; i++) {
      const row = new Array(n).fill(0);
      for (let c = 0; c < k; c++) row[own[c]] = J[i * k + c];
      for (let c = 0; c < kf; c++) {
        let s = 0;
        for (let u = 0; u < t; u++) s += C[i * t + u] * E[u * kf + c];
        row[fcols[c]] = s;
      }
      for (let c = 0; c < n; c++) expect(groupJacobianEntry(grp, i, c)).toBeCloseTo(row[c], 14);
      dense.push(row);
    }
    const { A, g } = groupedNormalEquations(n, [grp]);
    for (let a = 0; a < n; a++) {
      expect(g[a]).toBeCloseTo(dense.reduce((s, row, i) => s + row[a] * r[i], 0), 12);
      for (let b = 0; b < n; b++) expect(A[a * n + b]).toBeCloseTo(b <= a ? dense.reduce((s, row) => s + row[a] * row[b], 0) : 0, 12);
    }
    // The same group with every column 3 higher, shifted back to a part's own numbering, gives the same matrix.
    const up = { ...grp, columns: own.map((c) => c + 3), factored: { ...grp.factored, columns: fcols.map((c) => c + 3) } };
    const shifted = groupedNormalEquations(n, shiftedGroups([up], 3));
    expect(Array.from(shifted.A)).toEqual(Array.from(A));
    expect(Array.from(shifted.g)).toEqual(Array.from(g));
  });
  it('equals the expanded dense JᵀJ for odd widths and more intermediates (the edges of the blocked products)', () => {
    const rng = new Xorshift128(5);
    const m = 70;
    const t = 10;
    const n = 20;
    // Columns 0, 2, 4, … up to 18 factored (kf = 9, odd), the rest own (k = 11, odd).
    const fcols = Int32Array.from([0, 2, 4, 6, 8, 10, 12, 14, 16]);
    const own = Int32Array.from([1, 3, 5, 7, 9, 11, 13, 15, 17, 18, 19]);
    const grp = randomFactoredGroup(rng, m, t, own, fcols);
    const { r } = grp;
    const { A, g } = groupedNormalEquations(n, [grp]);
    const entry = (i: number, c: number) => groupJacobianEntry(grp, i, c);
    for (let a = 0; a < n; a++) {
      let ga = 0;
      for (let i = 0; i < m; i++) ga += entry(i, a) * r[i];
      expect(g[a]).toBeCloseTo(ga, 12);
      for (let b = 0; b < n; b++) {
        let s = 0;
        if (b <= a) for (let i = 0; i < m; i++) s += entry(i, a) * entry(i, b);
        expect(A[a * n + b]).toBeCloseTo(s, 12);
      }
    }
  });
});

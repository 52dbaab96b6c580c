import { describe, expect, it } from 'vitest';
import { groupsOnColumns } from '../../src/numerics/column-subset.js';
import { groupedNormalEquations, groupJacobianEntry } from '../../src/numerics/grouped-normal-equations.js';
import type { ResidualGroup } from '../../src/numerics/grouped-normal-equations.js';
import { Xorshift128 } from '../../src/numerics/random.js';

// The normal equations over a subset of columns against the same products of the dense
// Jacobian's kept columns, each entry read by the definition of the groups
// (groupJacobianEntry: own columns, or C·E for factored ones); common practice, no source.
describe('groupsOnColumns', () => {
  it('gives the kept columns’ JᵀJ, Jᵀr and the whole cost, factored columns included', () => {
    const n = 14;
    const rng = new Xorshift128(7);
    const rand = (k: number) => Float64Array.from({ length: k }, () => rng.next() - 0.5);
    const plain = (columns: number[], rows: number): ResidualGroup => ({ columns: Int32Array.from(columns), J: rand(rows * columns.length), r: rand(rows) });
    const withFactor = plain([6, 7, 8, 9, 10], 9);
    const t = 3;
    const fcols = [0, 1, 2, 3, 4, 5];
    withFactor.factored = { columns: Int32Array.from(fcols), t, C: rand(9 * t), E: rand(t * fcols.length) };
    const groups = [plain([0, 1, 2, 3, 4, 5], 7), withFactor, plain([11, 12, 13], 5)];
    const keep = Int32Array.from([2, 4, 9, 10]);
    const sub = groupsOnColumns(groups, keep);
    const { A, g, cost } = groupedNormalEquations(keep.length, sub);
    const whole = groupedNormalEquations(n, groups);
    expect(cost).toBeCloseTo(whole.cost, 13);
    const k = keep.length;
    for (let a = 0; a < k; a++) {
      let ga = 0;
      for (const grp of groups) for (let i = 0; i < grp.r.length; i++) ga += groupJacobianEntry(grp, i, keep[a]) * grp.r[i];
      expect(g[a]).toBeCloseTo(ga, 12);
      for (let b = 0; b <= a; b++) {
        let ab = 0;
        for (const grp of groups) for (let i = 0; i < grp.r.length; i++) ab += groupJacobianEntry(grp, i, keep[a]) * groupJacobianEntry(grp, i, keep[b]);
        expect(A[a * k + b]).toBeCloseTo(ab, 12);
      }
    }
    // Column 9 of the whole problem's normal matrix is the subset's column 2.
    expect(A[2 * k + 2]).toBeCloseTo(whole.A[9 * n + 9], 12);
  });
});

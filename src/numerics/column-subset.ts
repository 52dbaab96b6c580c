/**
 * A grouped Jacobian (numerics/grouped-normal-equations.ts) restricted to a few of its
 * columns: the least-squares problem over those parameters alone, the others held fixed.
 * Used for the output-layer solves of the second-order phase (a network's last layer is a
 * small block of columns whose normal matrix costs almost nothing beside the whole
 * propagator's). Factored columns among the kept ones are formed explicitly, C·E on those
 * columns only. Units: those of the groups.
 */
import type { ResidualGroup } from './grouped-normal-equations.js';

/**
 * The groups on `keep` (global columns, strictly ascending), renumbered 0 … keep.length − 1;
 * a group that touches none of them keeps its residuals with no columns, so the cost is the
 * same as the whole problem's.
 */
export function groupsOnColumns(groups: readonly ResidualGroup[], keep: Int32Array): ResidualGroup[] {
  const local = new Map<number, number>();
  keep.forEach((c, i) => local.set(c, i));
  return groups.map((grp) => {
    const m = grp.r.length;
    const own: { from: number; to: number }[] = [];
    grp.columns.forEach((c, a) => {
      const to = local.get(c);
      if (to !== undefined) own.push({ from: a, to });
    });
    const f = grp.factored;
    const viaFactor: { from: number; to: number }[] = [];
    if (f) {
      f.columns.forEach((c, a) => {
        const to = local.get(c);
        if (to !== undefined) viaFactor.push({ from: a, to });
      });
    }
    const all = [...own.map((o) => ({ ...o, factored: false })), ...viaFactor.map((o) => ({ ...o, factored: true }))].sort((a, b) => a.to - b.to);
    const k = all.length;
    const J = new Float64Array(m * k);
    const kg = grp.columns.length;
    for (let i = 0; i < m; i++) {
      for (let c = 0; c < k; c++) {
        const e = all[c];
        if (!e.factored) J[i * k + c] = grp.J[i * kg + e.from];
        else {
          const t = f!.t;
          const kf = f!.columns.length;
          let s = 0;
          for (let u = 0; u < t; u++) {
            const cu = f!.C[i * t + u];
            if (cu !== 0) s += cu * f!.E[u * kf + e.from];
          }
          J[i * k + c] = s;
        }
      }
    }
    return { columns: Int32Array.from(all, (e) => e.to), J, r: grp.r };
  });
}

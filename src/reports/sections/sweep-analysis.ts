/**
 * What a sweep's rows say, computed once for the sweep pages and the title page:
 *  - the order–disorder estimate, where F − F_dis crosses zero along χN. Mean-field theory
 *    gives a continuous transition at f = 1/2 with F − F_dis ∝ −(χN − χN_ODT)² just above it
 *    (Leibler, Macromolecules 13, 1602 (1980)), so √(F_dis − F) is close to linear in χN there:
 *    the estimate extrapolates it from the two ordered points nearest the transition to zero,
 *    and is bracketed by the last disordered and first ordered grid points. Off f = 1/2 the
 *    transition is first order and the same extrapolation is a rough estimate: said so.
 *  - the strong-segregation exponent: a least-squares line through ln D against ln χN over the
 *    ordered points at the largest χN (D ∝ χN^(1/6) in the strong-segregation limit: Semenov,
 *    Sov. Phys. JETP 61, 733 (1985)); its standard error from the scatter of the fit.
 * Units: D in Rg, F in kT per chain.
 */
import type { SweepInput, SweepPointInput } from '../report-inputs.js';

export interface SweepSeries {
  /** f and b_A/b_B of the series (the χN line). */
  f: number;
  ratio: number;
  points: SweepPointInput[];
  spinodalChiN: number;
  odt?: { estimate: number; bracket: [number, number]; exact: boolean };
  exponent?: { value: number; standardError: number; chiNRange: [number, number]; points: number; prefactor: number };
}

const ordered = (p: SweepPointInput): boolean => p.phase !== 'disordered' && p.period !== null && p.freeEnergy !== null && p.freeEnergyDisordered !== null;
const excess = (p: SweepPointInput): number => p.freeEnergy! - p.freeEnergyDisordered!;
/** Below this |F − F_dis| (kT per chain) a point counts as disordered: solver round-off. */
const ZERO = 1e-9;

function odtOf(points: SweepPointInput[]): SweepSeries['odt'] {
  const byChiN = [...points].sort((a, b) => a.chiN - b.chiN);
  const firstOrdered = byChiN.findIndex((p) => ordered(p) && excess(p) < -ZERO);
  if (firstOrdered <= 0) return undefined;
  const before = byChiN[firstOrdered - 1];
  const after = byChiN[firstOrdered];
  const bracket: [number, number] = [before.chiN, after.chiN];
  // A metastable lamella with F − F_dis > 0 just below: linear interpolation of the sign change.
  if (ordered(before) && excess(before) > ZERO) {
    const a = excess(before);
    const b = excess(after);
    return { estimate: before.chiN + (a / (a - b)) * (after.chiN - before.chiN), bracket, exact: false };
  }
  const next = byChiN.slice(firstOrdered + 1).find((p) => ordered(p) && excess(p) < -ZERO);
  if (!next) return { estimate: 0.5 * (bracket[0] + bracket[1]), bracket, exact: false };
  const r1 = Math.sqrt(-excess(after));
  const r2 = Math.sqrt(-excess(next));
  const est = after.chiN - (r1 * (next.chiN - after.chiN)) / (r2 - r1);
  return { estimate: Math.min(bracket[1], Math.max(bracket[0], est)), bracket, exact: false };
}

function exponentOf(points: SweepPointInput[]): SweepSeries['exponent'] {
  const ord = points.filter(ordered).sort((a, b) => a.chiN - b.chiN);
  // The strong-segregation side: the ordered points in the upper half of the ordered χN range, at least three.
  if (ord.length < 3) return undefined;
  const lo = ord[0].chiN;
  const hi = ord[ord.length - 1].chiN;
  let use = ord.filter((p) => p.chiN >= lo + 0.5 * (hi - lo));
  if (use.length < 3) use = ord.slice(-3);
  const xs = use.map((p) => Math.log(p.chiN));
  const ys = use.map((p) => Math.log(p.period!));
  const n = xs.length;
  const mx = xs.reduce((a, b) => a + b, 0) / n;
  const my = ys.reduce((a, b) => a + b, 0) / n;
  const sxx = xs.reduce((a, x) => a + (x - mx) ** 2, 0);
  if (!(sxx > 0)) return undefined;
  const slope = xs.reduce((a, x, i) => a + (x - mx) * (ys[i] - my), 0) / sxx;
  const intercept = my - slope * mx;
  const rss = xs.reduce((a, x, i) => a + (ys[i] - intercept - slope * x) ** 2, 0);
  const se = n > 2 ? Math.sqrt(rss / (n - 2) / sxx) : Number.NaN;
  return { value: slope, standardError: se, chiNRange: [use[0].chiN, use[use.length - 1].chiN], points: n, prefactor: Math.exp(intercept) };
}

/** One series per (f, b_A/b_B), each along χN. */
export function sweepSeries(s: SweepInput): SweepSeries[] {
  const groups = new Map<string, SweepPointInput[]>();
  for (const p of s.points) {
    const k = `${p.f}|${p.segmentRatio}`;
    if (!groups.has(k)) groups.set(k, []);
    groups.get(k)!.push(p);
  }
  return [...groups.values()].map((pts) => {
    const sorted = [...pts].sort((a, b) => a.chiN - b.chiN);
    return { f: sorted[0].f, ratio: sorted[0].segmentRatio, points: sorted, spinodalChiN: sorted[0].spinodalChiN, odt: odtOf(sorted), exponent: exponentOf(sorted) };
  });
}

/**
 * A parameter sweep: F − F_dis, the period D and Q against χN (or against f or b_A/b_B when
 * only those vary), one curve per combination of the other parameters; the RPA spinodal and
 * the order–disorder estimate marked; the strong-segregation exponent of D(χN) fitted
 * (sweep-analysis.ts); and the table of points. D in Rg, F in kT per chain, Q dimensionless.
 */
import type { Block, FigureBlock, ReportPage } from '../document.js';
import { drawLineChart } from '../charts/line-chart.js';
import type { GuideLine, LineSeries } from '../charts/line-chart.js';
import type { ReportInput, SweepInput, SweepPointInput } from '../report-inputs.js';
import { CONTENT_WIDTH } from '../style.js';
import { sci, sig } from '../format.js';
import { phaseText } from './key-results.js';
import { sweepSeries } from './sweep-analysis.js';
import { PARAMETER_LABELS } from '../../surrogate/parameter-space.js';
import type { SweepSeries } from './sweep-analysis.js';
import type { ReportSection } from './section.js';

type Axis = 'chiN' | 'f' | 'segmentRatio';
const AXIS_LABEL: Record<Axis, string> = { chiN: 'χN (–)', f: 'A fraction f (–)', segmentRatio: 'segment-length ratio b_A/b_B (–)' };
const distinct = (pts: SweepPointInput[], k: Axis): number => new Set(pts.map((p) => p[k])).size;

function xAxisOf(s: SweepInput): Axis {
  return (['chiN', 'f', 'segmentRatio'] as const).find((k) => distinct(s.points, k) > 1) ?? 'chiN';
}

/** Curves along the x axis, one per combination of the other parameters. */
function groups(s: SweepInput, x: Axis): { label: string; points: SweepPointInput[] }[] {
  const others = (['chiN', 'f', 'segmentRatio'] as const).filter((k) => k !== x && distinct(s.points, k) > 1);
  const map = new Map<string, SweepPointInput[]>();
  for (const p of s.points) {
    const key = others.map((k) => `${PARAMETER_LABELS[k].symbol} = ${sig(p[k], 4)}`).join(', ');
    if (!map.has(key)) map.set(key, []);
    map.get(key)!.push(p);
  }
  return [...map.entries()].map(([label, points]) => ({ label: label || 'sweep points', points: points.sort((a, b) => a[x] - b[x]) }));
}

function figure(id: string, caption: string, height: number, draw: FigureBlock['draw']): Block {
  return { type: 'figure', id, width: CONTENT_WIDTH, height, caption, draw };
}

function sweepPages(s: SweepInput): ReportPage[] {
  const x = xAxisOf(s);
  const gs = groups(s, x);
  const series = x === 'chiN' ? sweepSeries(s) : [];
  const ordered = (p: SweepPointInput) => p.phase !== 'disordered';
  const excessSeries: LineSeries[] = gs.map((g, k) => ({
    label: g.label,
    style: k + 1,
    markers: true,
    points: g.points.filter((p) => p.freeEnergy !== null && p.freeEnergyDisordered !== null).map((p) => ({ x: p[x], y: p.freeEnergy! - p.freeEnergyDisordered! })),
  }));
  const guides: GuideLine[] = [];
  if (x === 'chiN') {
    const spinodals = [...new Set(series.map((r) => r.spinodalChiN))];
    spinodals.forEach((c, i) => guides.push({ axis: 'x', value: c, label: spinodals.length === 1 ? `RPA spinodal χN = ${sig(c, 4)}` : undefined, style: 6 + i }));
    series.forEach((r, i) => r.odt && guides.push({ axis: 'x', value: r.odt.estimate, label: series.length === 1 ? `order–disorder estimate ≈ ${sig(r.odt.estimate, 4)}` : undefined, style: 5 + i, labelRow: 1 }));
  }
  const odtText = series
    .map((r: SweepSeries) => {
      const tag = series.length > 1 ? ` at f = ${sig(r.f, 3)}, b_A/b_B = ${sig(r.ratio, 3)}` : '';
      const odt = r.odt ? `order–disorder estimate χN ≈ ${sig(r.odt.estimate, 4)} (bracketed by the grid points ${sig(r.odt.bracket[0], 4)} and ${sig(r.odt.bracket[1], 4)}; from √(F_dis − F) extrapolated linearly to zero, as a continuous transition gives; off f = 1/2 the mean-field transition is first order and this is a rough estimate)` : 'no change from disordered to ordered inside the grid, so no order–disorder estimate';
      return `RPA spinodal${tag}: χN = ${sig(r.spinodalChiN, 5)} (Leibler 1980); ${odt}.`;
    })
    .join(' ');
  const blocks: Block[] = [
    figure(
      'sweep-free-energy',
      `Figure: free energy of the lamella relative to the disordered melt, F − F_dis (kT per chain), against ${AXIS_LABEL[x]}; disordered points sit at 0. ${x === 'chiN' ? `Dotted lines: the RPA spinodal and the order–disorder estimate. ${odtText}` : ''}`,
      230,
      (r) => drawLineChart(r, { series: excessSeries, xLabel: AXIS_LABEL[x], yLabel: 'F − F_dis (kT per chain)', legend: gs.length > 1, guides: [...guides, { axis: 'y', value: 0, style: 0 }] }),
    ),
  ];
  const periodSeries: LineSeries[] = gs.map((g, k) => ({ label: g.label, style: k + 1, markers: true, points: g.points.filter((p) => ordered(p) && p.period !== null).map((p) => ({ x: p[x], y: p.period! })) }));
  const fits = series.filter((r) => r.exponent);
  for (const [i, r] of fits.entries()) {
    const e = r.exponent!;
    const xs = Array.from({ length: 30 }, (_, k) => e.chiNRange[0] + ((e.chiNRange[1] - e.chiNRange[0]) * k) / 29);
    periodSeries.push({ label: `fit D ∝ χN^${sig(e.value, 3)}${fits.length > 1 ? ` (f = ${sig(r.f, 3)})` : ''}`, style: 0, points: xs.map((c) => ({ x: c, y: e.prefactor * c ** e.value })) });
    void i;
  }
  const expText = fits.map((r) => `fitted exponent a = ${sig(r.exponent!.value, 3)} ± ${sig(r.exponent!.standardError, 2)} (standard error) over χN ${sig(r.exponent!.chiNRange[0], 3)}–${sig(r.exponent!.chiNRange[1], 3)}, ${r.exponent!.points} points${fits.length > 1 ? `, f = ${sig(r.f, 3)}` : ''}`).join('; ');
  blocks.push(
    figure(
      'sweep-period',
      `Figure: the equilibrium (stress-free) period D (Rg) of the ordered points against ${AXIS_LABEL[x]}. ${fits.length ? `Solid line: D ∝ χN^a fitted by least squares to ln D against ln χN over the upper half of the ordered χN range; ${expText}. In the strong-segregation limit a = 1/6 (Semenov, Sov. Phys. JETP 61, 733 (1985)); at finite χN the effective exponent is larger (common practice, no source).` : ''}`,
      210,
      (r) => drawLineChart(r, { series: periodSeries, xLabel: AXIS_LABEL[x], yLabel: 'period D / Rg', legend: true }),
    ),
  );
  const qSeries: LineSeries[] = gs.map((g, k) => ({ label: g.label, style: k + 1, markers: true, points: g.points.filter((p) => p.Q !== null && p.Q > 0).map((p) => ({ x: p[x], y: p.Q! })) }));
  blocks.push(
    figure('sweep-partition-function', `Figure: the single-chain partition function Q (–, log axis) against ${AXIS_LABEL[x]}, in the gauge where the mean field is zero (disordered melt: Q = 1).`, 170, (r) =>
      drawLineChart(r, { series: qSeries, xLabel: AXIS_LABEL[x], yLabel: 'Q (–)', yLog: true, legend: gs.length > 1, guides: x === 'chiN' ? guides : [] }),
    ),
  );
  const rows = [...s.points].sort((a, b) => a.f - b.f || a.segmentRatio - b.segmentRatio || a.chiN - b.chiN);
  const table: Block = {
    type: 'table',
    header: ['χN', 'f', 'b_A/b_B', 'phase', 'D / Rg', 'F (kT/chain)', 'F − F_dis (kT/chain)', 'Q', 'converged'],
    widths: [0.8, 0.6, 0.8, 1.1, 0.9, 1.2, 1.5, 1.1, 1.1],
    alignRight: [0, 1, 2, 4, 5, 6, 7],
    rows: rows.map((p) => [
      sig(p.chiN, 5),
      sig(p.f, 3),
      sig(p.segmentRatio, 3),
      p.phase,
      p.period === null || p.phase === 'disordered' ? '–' : sig(p.period, 5),
      p.freeEnergy === null ? 'n/a' : sig(p.freeEnergy, 6),
      p.freeEnergy === null || p.freeEnergyDisordered === null ? 'n/a' : p.phase === 'disordered' ? '0' : sci(p.freeEnergy - p.freeEnergyDisordered, 3),
      p.Q === null ? 'n/a' : sig(p.Q, 5),
      p.converged ? 'yes' : 'NO',
    ]),
  };
  return [
    { heading: `Sweep of ${s.chainLabel}: order–disorder transition and period`, blocks: [blocks[0], blocks[1]] },
    { heading: 'Sweep: partition function and every point', blocks: [blocks[2], { type: 'text', lines: [`${s.points.length} points; "lamellar" is ${phaseText('lamellar')}. Disordered points have no period.`], style: 'small' }, table] },
  ];
}

// A sweep over film thickness has its own pages (film-sweep-section.ts): its χN axis is not the one to draw.
export const sweepSection: ReportSection = { id: 'sweep', pages: (input: ReportInput) => (input.sweep && !input.sweep.film ? sweepPages(input.sweep) : []) };

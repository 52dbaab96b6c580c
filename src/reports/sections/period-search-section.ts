/** F(L) from the equilibrium-period search, with the minimum marked and the evaluations listed. */
import type { ReportPage } from '../document.js';
import { drawLineChart } from '../charts/line-chart.js';
import type { LineSeries } from '../charts/line-chart.js';
import type { PeriodSearchInput, ReportInput } from '../report-inputs.js';
import { CONTENT_WIDTH } from '../style.js';
import { sci, sig } from '../format.js';
import type { ReportSection } from './section.js';

function periodPage(p: PeriodSearchInput): ReportPage {
  const sorted = [...p.trace].sort((a, b) => a.period - b.period);
  const lam = sorted.filter((t) => t.phase === 'lamellar');
  const other = sorted.filter((t) => t.phase !== 'lamellar');
  const series: LineSeries[] = [{ label: 'evaluated F(L), lamellar', points: lam.map((t) => ({ x: t.period, y: t.freeEnergy })), style: 0, markers: true }];
  if (other.length) series.push({ label: 'collapsed to disordered', points: other.map((t) => ({ x: t.period, y: t.freeEnergy })), style: 1, line: false, markers: true });
  const best = p.trace.find((t) => t.period === p.period) ?? lam.reduce((a, b) => (b.freeEnergy < a.freeEnergy ? b : a), lam[0]);
  if (best) series.push({ label: 'chosen minimum', points: [{ x: best.period, y: best.freeEnergy }], style: 2, line: false, markers: true, markerSize: 5 });
  const tol = p.periodTolerance !== undefined ? ` ± ${sci(p.periodTolerance, 1)}` : '';
  return {
    heading: 'Equilibrium period search',
    blocks: [
      {
        type: 'figure',
        id: 'period-search',
        width: CONTENT_WIDTH,
        height: 280,
        caption: `Figure: free energy per chain F against the cell period L at fixed f and χN; the stress-free period minimises F: L* = ${sig(p.period, 6)} Rg${tol}. Points are the solver's evaluations in the order of the table below.`,
        draw: (region) =>
          drawLineChart(region, {
            series,
            xLabel: 'period L / Rg',
            yLabel: 'F (kT per chain)',
            legend: true,
            guides: Number.isFinite(p.period) ? [{ axis: 'x', value: p.period, label: `L* = ${sig(p.period, 5)} Rg`, style: 2 }] : [],
          }),
      },
      {
        type: 'table',
        header: ['#', 'L / Rg', 'F (kT per chain)', 'phase', 'iterations'],
        widths: [0.5, 2, 2.5, 2, 1.3],
        alignRight: [0, 1, 2, 4],
        rows: p.trace.slice(0, 24).map((t, i) => [String(i + 1), t.period.toFixed(6), t.freeEnergy.toFixed(9), t.phase, String(t.iterations)]),
      },
      ...(p.trace.length > 24 ? [{ type: 'text' as const, lines: [`(${p.trace.length - 24} further evaluations not listed)`], style: 'small' as const }] : []),
    ],
  };
}

export const periodSearchSection: ReportSection = {
  id: 'period-search',
  pages: (input: ReportInput) => (input.periodSearch && input.periodSearch.trace.length ? [periodPage(input.periodSearch)] : []),
};

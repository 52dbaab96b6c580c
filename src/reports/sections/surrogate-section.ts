/**
 * A surrogate's error map: φA relative L2 and F error at the held-out points against fresh
 * reference solves, drawn against the parameter (one varying parameter) or as a map over the
 * anchor cells (two); the period model L(θ) against the anchors' and held-out points'
 * equilibrium periods; the training rounds; and a table of every held-out point.
 */
import type { Block, ReportPage } from '../document.js';
import { drawHeatMap } from '../charts/heat-map.js';
import { drawLineChart } from '../charts/line-chart.js';
import type { GuideLine } from '../charts/line-chart.js';
import type { ReportInput, SurrogateInput } from '../report-inputs.js';
import { CONTENT_WIDTH } from '../style.js';
import { sci, sig } from '../format.js';
import type { ReportSection } from './section.js';

function errorCharts(s: SurrogateInput): Block[] {
  const a = s.parameters[0];
  const byX = [...s.heldOut].sort((p, q) => p.values[0] - q.values[0]);
  const anchorGuides: GuideLine[] = s.anchors.map((an) => ({ axis: 'x', value: an.values[0], style: 6 }));
  const xLabel = `${a.symbol} (–)`;
  const fine = Array.from({ length: 101 }, (_, i) => a.min + ((a.max - a.min) * i) / 100);
  return [
    {
      type: 'figure',
      id: 'surrogate-error',
      width: CONTENT_WIDTH,
      height: 220,
      caption: `Figure: φA relative L2 error at the ${s.heldOut.length} held-out points (not used in training) against a fresh reference solve at each point's equilibrium period, compared on t = x/L; the baseline interpolates the anchors' reference profiles linearly in ${a.symbol} (no network, the anchors only). Dotted lines: the ${s.anchors.length} anchors. Largest surrogate error ${sci(Math.max(...s.heldOut.map((h) => h.phiARelativeL2)))}.`,
      draw: (r) =>
        drawLineChart(r, {
          series: [
            { label: 'surrogate', style: 1, markers: true, points: byX.map((h) => ({ x: h.values[0], y: h.phiARelativeL2 })) },
            { label: 'anchors interpolated (baseline)', style: 2, markers: true, points: byX.map((h) => ({ x: h.values[0], y: Math.max(h.anchorInterpolationPhiA, 1e-12) })) },
          ],
          xLabel,
          yLabel: 'φA relative L2 error (–)',
          yLog: true,
          xMin: a.min,
          xMax: a.max,
          legend: true,
          guides: anchorGuides,
        }),
    },
    {
      type: 'figure',
      id: 'surrogate-free-energy-error',
      width: CONTENT_WIDTH,
      height: 170,
      caption: `Figure: |F_surrogate − F_reference| (kT per chain) at the held-out points; largest ${sci(Math.max(...s.heldOut.map((h) => Math.abs(h.freeEnergyError))))} kT.`,
      draw: (r) =>
        drawLineChart(r, {
          series: [{ label: '|F error|', style: 1, markers: true, points: byX.map((h) => ({ x: h.values[0], y: Math.max(Math.abs(h.freeEnergyError), 1e-12) })) }],
          xLabel,
          yLabel: '|F error| (kT per chain)',
          yLog: true,
          xMin: a.min,
          xMax: a.max,
          legend: false,
          guides: anchorGuides,
        }),
    },
    {
      type: 'figure',
      id: 'surrogate-period',
      width: CONTENT_WIDTH,
      height: 170,
      caption: `Figure: the period L(${a.symbol}) the surrogate uses (monotone cubic through the anchors' equilibrium periods) with the equilibrium periods of the anchors and of the held-out reference solves; largest relative period error at the held-out points ${sci(Math.max(...s.heldOut.map((h) => Math.abs(h.periodRelativeError))))}.`,
      draw: (r) =>
        drawLineChart(r, {
          series: [
            { label: 'L(θ), interpolated', style: 0, points: fine.map((x) => ({ x, y: s.periodAt([x]) })) },
            { label: 'anchors', style: 1, line: false, markers: true, points: s.anchors.map((an) => ({ x: an.values[0], y: an.period })) },
            { label: 'held-out (reference)', style: 2, line: false, markers: true, points: byX.map((h) => ({ x: h.values[0], y: h.referencePeriod })) },
          ],
          xLabel,
          yLabel: 'period L / Rg',
          xMin: a.min,
          xMax: a.max,
          legend: true,
        }),
    },
  ];
}

function errorMap(s: SurrogateInput): Block[] {
  const [a, b] = s.parameters;
  const cols = a.anchors - 1;
  const cells = s.heldOut.slice(0, s.cellCentres);
  const rows = Array.from({ length: b.anchors - 1 }, (_, i) => Float64Array.from({ length: cols }, (_, j) => Math.log10(cells[i * cols + j].phiARelativeL2)));
  return [
    {
      type: 'figure',
      id: 'surrogate-error-map',
      width: CONTENT_WIDTH,
      height: 300,
      caption: `Figure: log10 of the φA relative L2 error at the centre of each anchor cell (held-out points, not used in training), against a fresh reference solve at the equilibrium period; each cell spans neighbouring anchors. Largest error ${sci(Math.max(...cells.map((c) => c.phiARelativeL2)))}; the random held-out points are in the table below.`,
      draw: (r) => drawHeatMap(r, { title: 'φA relative L2 error at the anchor-cell centres', rows, length: 1, map: 'sequential', colourBarLabel: 'log10 φA relative L2', xLabel: a.symbol, yLabel: b.symbol, box: { x: [a.min, a.max], y: [b.min, b.max] } }),
    },
  ];
}

function surrogatePage(s: SurrogateInput): ReportPage {
  const names = s.parameters.map((p) => p.symbol);
  const rounds = s.history.filter((h) => h.round > 0);
  const evaluated = s.history.filter((h) => h.phiError !== undefined);
  const worst = s.heldOut.reduce((w, h) => (h.phiARelativeL2 > w.phiARelativeL2 ? h : w));
  const blocks: Block[] = [
    {
      type: 'text',
      lines: [
        `Trained range: ${s.parameters.map((p) => `${p.symbol} in [${sig(p.min, 5)}, ${sig(p.max, 5)}], ${p.anchors} anchors`).join('; ')}.`,
        ...s.timing,
        `The system on the title page and the profile and metrics pages is the held-out point with the largest φA error, ${names.map((n, i) => `${n} = ${sig(worst.values[i], 6)}`).join(', ')}: the surrogate there against its reference solve, drawn on t = x/L.`,
      ],
    },
    ...(s.parameters.length === 1 ? errorCharts(s) : s.parameters.length === 2 ? errorMap(s) : []),
  ];
  if (rounds.length || evaluated.length) {
    blocks.push({
      type: 'figure',
      id: 'surrogate-rounds',
      width: CONTENT_WIDTH,
      height: 170,
      caption: 'Figure: training rounds (round 0 is the fit to the reference data): the largest SCFT residual max |w_out − w| of the network fields over each round\'s points before its update (kT), and the largest held-out φA error where evaluated.',
      draw: (r) =>
        drawLineChart(r, {
          series: [
            { label: 'SCFT residual (kT)', style: 1, markers: true, points: rounds.filter((h) => h.residual !== null && h.residual > 0).map((h) => ({ x: h.round, y: h.residual! })) },
            { label: 'held-out φA error', style: 2, markers: true, points: evaluated.map((h) => ({ x: h.round, y: h.phiError! })) },
          ],
          xLabel: 'round',
          yLabel: 'residual / error',
          yLog: true,
          legend: true,
        }),
    });
  }
  blocks.push({
    type: 'table',
    header: [...names, 'φA rel. L2', 'baseline φA', 'F error / kT', 'period error'],
    widths: [...names.map(() => 1.2), 1.5, 1.5, 1.5, 1.5],
    alignRight: Array.from({ length: names.length + 4 }, (_, i) => i),
    rows: s.heldOut.map((h) => [...h.values.map((v) => sig(v, 5)), sci(h.phiARelativeL2), sci(h.anchorInterpolationPhiA), sci(h.freeEnergyError), sci(h.periodRelativeError)]),
  });
  return { heading: 'Surrogate: error over the parameter range', blocks };
}

export const surrogateSection: ReportSection = {
  id: 'surrogate',
  pages: (input: ReportInput) => (input.surrogate ? [surrogatePage(input.surrogate)] : []),
};

/**
 * Fits to ordered-sample measurements: Bragg peaks (fit-bragg) and the domain-spacing series
 * (fit-spacing). Each page: the data with one-σ error bars against the model with the
 * normalised residuals beneath, the profile likelihood of χN (or χ) with its 68.3 % interval
 * shaded and the 95 % ends marked, and the assumptions the value rests on.
 */
import type { BraggFitFile, SpacingFitFile } from '../../io/formats/measurement-fits.js';
import type { Block, ReportPage } from '../document.js';
import { drawLineChart } from '../charts/line-chart.js';
import { drawInSubRegion } from '../region.js';
import type { ReportInput } from '../report-inputs.js';
import { CONTENT_WIDTH } from '../style.js';
import { sig } from '../format.js';
import type { ReportSection } from './section.js';

interface DataPanel {
  id: string;
  caption: string;
  xLabel: string;
  yLabel: string;
  yLog: boolean;
  /** x is a whole number (a peak order). */
  xIntegers?: boolean;
  x: number[];
  y: number[];
  dy: number[] | null;
  model: number[];
  modelLabel: string;
  residual: number[];
}

/** A symmetric residual axis on round values, so that 0 and ±2 are ticks. */
function residualLimit(r: number[]): number {
  const m = Math.max(2, ...r.map((v) => Math.abs(v)));
  return m <= 3 ? 3 : m <= 4 ? 4 : Math.ceil(m / 2) * 2;
}

function dataFigure(p: DataPanel): Block {
  const pad = (Math.max(...p.x) - Math.min(...p.x)) * 0.06 || 0.5;
  const xMin = Math.min(...p.x) - pad;
  const xMax = Math.max(...p.x) + pad;
  const lim = residualLimit(p.residual);
  return {
    type: 'figure',
    id: p.id,
    width: CONTENT_WIDTH,
    height: 290,
    caption: p.caption,
    draw(region) {
      const topH = region.height * 0.64;
      drawInSubRegion(region, 0, 0, region.width, topH, (r) =>
        drawLineChart(r, {
          series: [
            { label: p.modelLabel, style: 0, line: false, markers: true, markerSize: 5, points: p.x.map((x, i) => ({ x, y: p.model[i] })) },
            { label: p.dy ? 'data ± σ' : 'data', style: 1, line: false, markers: true, points: p.x.map((x, i) => ({ x, y: p.y[i] })), ...(p.dy ? { errorBars: p.dy } : {}) },
          ],
          xLabel: p.xLabel,
          yLabel: p.yLabel,
          yLog: p.yLog,
          xIntegers: p.xIntegers,
          xMin,
          xMax,
        }),
      );
      drawInSubRegion(region, 0, topH, region.width, region.height - topH, (r) =>
        drawLineChart(r, {
          series: [{ label: 'normalised residual', style: 1, line: false, markers: true, points: p.x.map((x, i) => ({ x, y: p.residual[i] })) }],
          xLabel: p.xLabel,
          yLabel: 'residual / σ',
          legend: false,
          xIntegers: p.xIntegers,
          xMin,
          xMax,
          yMin: -lim,
          yMax: lim,
          guides: [{ axis: 'y', value: 0, style: 0 }],
        }),
      );
    },
  };
}

function profileFigure(id: string, symbol: string, points: { x: number; d: number }[], i68: [number, number], i95: [number, number], threshold68: number, what: string): Block {
  // The scan spans the whole search range, where Δχ² reaches hundreds: drawn whole, the
  // intervals would be a few pixels wide. The figure shows the 95 % interval and 1.5 of its
  // widths on each side; the whole scan stays in result.json.
  const width = i95[1] - i95[0];
  const zoom = Number.isFinite(width) && width > 0 ? { lo: i95[0] - 1.5 * width, hi: i95[1] + 1.5 * width } : undefined;
  const shown = zoom ? points.filter((p) => p.x >= zoom.lo && p.x <= zoom.hi) : points;
  const yTop = shown.length ? Math.max(...shown.map((p) => p.d)) : undefined;
  return {
    type: 'figure',
    id,
    width: CONTENT_WIDTH,
    height: 200,
    caption: `Figure: profile likelihood Δχ²(${symbol}), ${what} minimised at each ${symbol}; shaded the 68.3 % interval [${sig(i68[0], 5)}, ${sig(i68[1], 5)}], guides at the 95 % ends [${sig(i95[0], 5)}, ${sig(i95[1], 5)}]${zoom ? '; drawn over the 95 % interval and 1.5 of its widths on each side (the whole scan is in result.json)' : ''}.`,
    draw: (r) =>
      drawLineChart(r, {
        series: [{ label: 'Δχ²', style: 0, markers: true, points: shown.map((p) => ({ x: p.x, y: p.d })) }],
        ...(zoom ? { xMin: zoom.lo, xMax: zoom.hi, yMin: 0, ...(yTop !== undefined && yTop > 2 * threshold68 ? { yMax: yTop } : {}) } : {}),
        xLabel: `${symbol} (–)`,
        yLabel: 'Δχ² (–)',
        legend: false,
        band: { from: i68[0], to: i68[1] },
        guides: [
          { axis: 'y', value: threshold68, style: 1 },
          { axis: 'x', value: i95[0], label: '95 %', style: 2 },
          { axis: 'x', value: i95[1], style: 2 },
        ],
      }),
  };
}

const bullets = (title: string, lines: string[]): Block[] => (lines.length ? [{ type: 'text', lines: [title], style: 'heading' }, { type: 'text', lines: lines.map((l) => `• ${l}`), style: 'small' }] : []);

function braggPages(b: BraggFitFile): ReportPage[] {
  const i68 = b.intervals['68.3%'];
  const i95 = b.intervals['95%'];
  const positive = b.peaks.every((p) => p.I > 0 && p.model > 0);
  return [
    {
      heading: `Bragg-peak fit: χN = ${sig(b.chiN, 5)} from ${b.peaks.length} orders`,
      blocks: [
        dataFigure({
          id: 'bragg-fit',
          caption: `Figure: measured integrated intensities of each order with one-σ error bars and the model K·I_n/I_1 of the mean-field lamella at χN = ${sig(b.chiN, 5)} (K = ${sig(b.K, 4)} fitted)${positive ? ', on a logarithmic scale' : ''}; beneath, residuals (data − model)/σ, which should scatter within ±2 if the model and σ are right.`,
          xLabel: 'order n',
          yLabel: 'integrated intensity (data units)',
          yLog: positive,
          xIntegers: true,
          x: b.peaks.map((p) => p.order),
          y: b.peaks.map((p) => p.I),
          dy: b.peaks.map((p) => p.dI),
          model: b.peaks.map((p) => p.model),
          modelLabel: 'mean-field lamella',
          residual: b.peaks.map((p) => p.normalisedResidual),
        }),
        profileFigure('bragg-fit-profile', 'χN', b.profile.map((p) => ({ x: p.chiN, d: p.deltaChi2 })), [i68.lo, i68.hi], [i95.lo, i95.hi], b.thresholds['68.3%'], b.rgTie ? 'K' : 'the scale K'),
        ...bullets('What this χN rests on', b.assumptions),
        ...bullets('Notes', b.notes),
      ],
    },
  ];
}

function spacingPages(s: SpacingFitFile): ReportPage[] {
  const i68 = s.intervals['68.3%'];
  const i95 = s.intervals['95%'];
  const sd = s.points.map((p) => p.dD ?? s.sigma.value ?? Number.NaN);
  return [
    {
      heading: `Domain-spacing fit: χ = ${sig(s.chi, 4)}, b = ${sig(s.b, 4)} nm`,
      blocks: [
        dataFigure({
          id: 'spacing-fit',
          caption: `Figure: measured lamellar periods D against N${s.sigma.source === 'column' ? ' with one-σ error bars' : ` (σ = ${sig(s.sigma.value, 3)} nm estimated from the scatter)`} and the model D = L_eq(χN)·b·sqrt(N/6) of mean-field lamellae at χ = ${sig(s.chi, 4)}, b = ${sig(s.b, 4)} nm; beneath, residuals (data − model)/σ.`,
          xLabel: 'N (reference segments)',
          yLabel: 'D / nm',
          yLog: false,
          x: s.points.map((p) => p.N),
          y: s.points.map((p) => p.D),
          dy: s.sigma.source === 'column' ? s.points.map((p) => p.dD ?? 0) : null,
          model: s.points.map((p) => p.model),
          modelLabel: 'mean-field D(N)',
          residual: s.points.map((p, i) => (p.D - p.model) / sd[i]),
        }),
        profileFigure('spacing-fit-profile', 'χ', s.profile.map((p) => ({ x: p.chi, d: p.deltaChi2 })), i68.chi, i95.chi, s.thresholds['68.3%'], 'b'),
        ...bullets('What χ and b rest on', s.assumptions),
        ...bullets('Notes', s.notes),
      ],
    },
  ];
}

export const measurementFitSection: ReportSection = {
  id: 'measurement-fit',
  pages: (input: ReportInput) => [...(input.braggFit ? braggPages(input.braggFit) : []), ...(input.spacingFit ? spacingPages(input.spacingFit) : [])],
};

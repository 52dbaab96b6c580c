/**
 * Line and scatter charts through chart.js, in the house style: each series keeps one
 * colour, dash pattern and marker (style.ts); axis titles carry units; the legend is drawn
 * above the plot area so it never covers data. Guide lines, a shaded interval and error
 * bars are drawn by a small inline plugin in data coordinates.
 */
import type { Chart as ChartType, ChartConfiguration, Plugin, Scale } from 'chart.js';
import type { Region } from '../region.js';
import type { SeriesStyle } from '../style.js';
import { FONT_FAMILY, TEXT, seriesStyle } from '../style.js';
import { chartJs } from './chart-setup.js';
import { drawLegend } from './markers.js';
import { formatLogTick, formatTick, logTicks, niceTicks } from './ticks.js';

export interface LineSeries {
  label: string;
  points: { x: number; y: number }[];
  /** Index into the house series styles, or an explicit style. */
  style: number | SeriesStyle;
  line?: boolean;
  markers?: boolean;
  /** Marker radius in points (default 2.6). */
  markerSize?: number;
  /** One-σ error bar per point (same order as points). */
  errorBars?: number[];
}

export interface GuideLine {
  axis: 'x' | 'y';
  value: number;
  label?: string;
  style?: number | SeriesStyle;
  /** Where the label of a horizontal guide sits (default left). */
  labelAt?: 'left' | 'right';
  /** Vertical guides: the label's row from the top (0 default), so labels of close guides do not overlap. */
  labelRow?: number;
}

export interface LineChartSpec {
  title?: string;
  series: LineSeries[];
  xLabel: string;
  yLabel: string;
  yLog?: boolean;
  xMin?: number;
  xMax?: number;
  yMin?: number;
  yMax?: number;
  guides?: GuideLine[];
  /** A shaded x interval (e.g. a confidence interval). */
  band?: { from: number; to: number };
  /** A second, lighter shaded x interval drawn under the first (e.g. the wider 95 % interval). */
  outerBand?: { from: number; to: number };
  /** A second x axis along the top: value = x × scale (e.g. Rg when x is in nm), with its own title. */
  topAxis?: { label: string; scale: number };
  legend?: boolean;
  /** x takes whole values only (a peak order): ticks on whole numbers. */
  xIntegers?: boolean;
}

/** Whole-number ticks over [min, max], at most about 12 of them. */
function integerTicks(min: number, max: number): number[] {
  const lo = Math.ceil(min);
  const hi = Math.floor(max);
  const step = Math.max(1, Math.ceil((hi - lo + 1) / 12));
  const out: number[] = [];
  for (let v = lo; v <= hi; v += step) out.push(v);
  return out;
}

const resolve = (s: number | SeriesStyle): SeriesStyle => (typeof s === 'number' ? seriesStyle(s) : s);

/** Width kept for the y axis (ticks and title), so stacked panels line up. */
const Y_AXIS_WIDTH = 56;

function overlayPlugin(spec: LineChartSpec): Plugin<'line'> {
  return {
    id: 'mesofieldOverlay',
    beforeDatasetsDraw(chart: ChartType) {
      const { ctx, chartArea, scales } = chart;
      const shade = (b: { from: number; to: number }, fill: string) => {
        const x0 = scales.x.getPixelForValue(b.from);
        const x1 = scales.x.getPixelForValue(b.to);
        ctx.save();
        ctx.fillStyle = fill;
        ctx.fillRect(Math.max(chartArea.left, Math.min(x0, x1)), chartArea.top, Math.min(chartArea.right, Math.max(x0, x1)) - Math.max(chartArea.left, Math.min(x0, x1)), chartArea.bottom - chartArea.top);
        ctx.restore();
      };
      if (spec.outerBand) shade(spec.outerBand, 'rgba(0, 114, 178, 0.08)');
      if (spec.band) shade(spec.band, 'rgba(0, 114, 178, 0.18)');
    },
    afterDraw(chart: ChartType) {
      if (!spec.topAxis) return;
      // The top axis: the same positions as x, labelled in the second unit at its own round values.
      const { ctx, chartArea, scales } = chart;
      const k = spec.topAxis.scale;
      const lo = scales.x.min * k;
      const hi = scales.x.max * k;
      const ticks = niceTicks(Math.min(lo, hi), Math.max(lo, hi), 6);
      ctx.save();
      ctx.strokeStyle = '#000000';
      ctx.fillStyle = '#000000';
      ctx.lineWidth = 0.8;
      ctx.font = `${TEXT.tick}px "${FONT_FAMILY}"`;
      ctx.textAlign = 'center';
      ctx.textBaseline = 'bottom';
      for (const t of ticks) {
        const px = scales.x.getPixelForValue(t / k);
        ctx.beginPath();
        ctx.moveTo(px, chartArea.top);
        ctx.lineTo(px, chartArea.top - 3);
        ctx.stroke();
        ctx.fillText(formatTick(t, ticks), px, chartArea.top - 4);
      }
      ctx.font = `${TEXT.axis}px "${FONT_FAMILY}"`;
      ctx.textAlign = 'right';
      ctx.fillText(spec.topAxis.label, chartArea.right, chartArea.top - 4 - TEXT.tick - 2);
      ctx.restore();
    },
    afterDatasetsDraw(chart: ChartType) {
      const { ctx, chartArea, scales } = chart;
      ctx.save();
      ctx.beginPath();
      ctx.rect(chartArea.left, chartArea.top, chartArea.right - chartArea.left, chartArea.bottom - chartArea.top);
      ctx.clip();
      for (const s of spec.series) {
        if (!s.errorBars) continue;
        const st = resolve(s.style);
        ctx.strokeStyle = st.colour;
        ctx.lineWidth = 0.9;
        ctx.setLineDash([]);
        s.points.forEach((p, i) => {
          const e = s.errorBars![i];
          const px = scales.x.getPixelForValue(p.x);
          const lo = scales.y.getPixelForValue(p.y - e);
          const hi = scales.y.getPixelForValue(p.y + e);
          ctx.beginPath();
          ctx.moveTo(px, lo);
          ctx.lineTo(px, hi);
          ctx.moveTo(px - 2, lo);
          ctx.lineTo(px + 2, lo);
          ctx.moveTo(px - 2, hi);
          ctx.lineTo(px + 2, hi);
          ctx.stroke();
        });
      }
      ctx.font = `${TEXT.small}px "${FONT_FAMILY}"`;
      for (const g of spec.guides ?? []) {
        const st = resolve(g.style ?? 2);
        ctx.strokeStyle = st.colour;
        ctx.lineWidth = 1.1;
        ctx.setLineDash(st.dash.length ? st.dash : [4, 3]);
        ctx.beginPath();
        if (g.axis === 'x') {
          const px = scales.x.getPixelForValue(g.value);
          ctx.moveTo(px, chartArea.top);
          ctx.lineTo(px, chartArea.bottom);
        } else {
          const py = scales.y.getPixelForValue(g.value);
          ctx.moveTo(chartArea.left, py);
          ctx.lineTo(chartArea.right, py);
        }
        ctx.stroke();
        ctx.setLineDash([]);
        if (g.label) {
          ctx.fillStyle = st.colour;
          ctx.textBaseline = 'top';
          if (g.axis === 'x') {
            const px = scales.x.getPixelForValue(g.value);
            const w = ctx.measureText(g.label).width;
            const right = px + 3 + w < chartArea.right;
            ctx.textAlign = right ? 'left' : 'right';
            ctx.fillText(g.label, right ? px + 3 : px - 3, chartArea.top + 3 + (g.labelRow ?? 0) * (TEXT.small + 3));
          } else {
            const atRight = g.labelAt === 'right';
            ctx.textAlign = atRight ? 'right' : 'left';
            ctx.textBaseline = 'bottom';
            ctx.fillText(g.label, atRight ? chartArea.right - 3 : chartArea.left + 3, scales.y.getPixelForValue(g.value) - 2);
          }
        }
      }
      ctx.restore();
    },
  };
}

export function drawLineChart(region: Region, spec: LineChartSpec): void {
  const Chart = chartJs();
  const ctx = region.ctx;
  const showLegend = spec.legend ?? spec.series.length > 1;
  const entries = spec.series.map((s) => ({ label: s.label, style: resolve(s.style), line: s.line ?? true, marker: s.markers ?? false }));
  // Measure the legend first so chart.js can leave room for it.
  let top = 2;
  if (spec.title) top += TEXT.body + 4;
  let legendHeight = 0;
  if (showLegend) {
    legendHeight = drawLegend(ctx, entries, 0, 0, region.width - 50, true);
  }
  const padTop = top + legendHeight + 2 + (spec.topAxis ? TEXT.tick + TEXT.axis + 10 : 0);

  const config: ChartConfiguration<'line'> = {
    type: 'line',
    data: {
      datasets: spec.series.map((s, i) => {
        const st = resolve(s.style);
        const line = s.line ?? true;
        const markers = s.markers ?? false;
        return {
          label: s.label,
          data: s.points,
          // chart.js draws higher `order` first: later series end up on top.
          order: spec.series.length - i,
          borderColor: st.colour,
          backgroundColor: st.colour,
          borderDash: st.dash,
          borderWidth: 1.4,
          showLine: line,
          pointStyle: st.marker,
          pointRadius: markers ? (s.markerSize ?? 2.6) : 0,
          pointBorderWidth: 1,
          tension: 0,
          fill: false,
        };
      }),
    },
    options: {
      parsing: false,
      normalized: true,
      layout: { padding: { top: padTop, right: 8, left: 2, bottom: 0 } },
      plugins: { legend: { display: false }, tooltip: { enabled: false }, title: { display: false } },
      scales: {
        x: {
          type: 'linear',
          // End the x axis at the data (or the given limits), not at the next round tick.
          bounds: 'data',
          min: spec.xMin,
          max: spec.xMax,
          title: { display: true, text: spec.xLabel, font: { size: TEXT.axis } },
          ticks: { font: { size: TEXT.tick }, maxRotation: 0, autoSkip: false, callback: (v: number | string, _i: number, all: { value: number }[]) => formatTick(Number(v), all.map((t) => t.value)) },
          grid: { color: '#e4e4e4' },
          // Only round values as ticks: chart.js adds the data bounds as ticks and labels them
          // rounded to the step (3.264 shown as "3.3"), which misreads the axis.
          afterBuildTicks: (scale: Scale) => void (scale.ticks = (spec.xIntegers ? integerTicks(scale.min, scale.max) : niceTicks(scale.min, scale.max, 8)).map((value) => ({ value }))),
        },
        y: {
          type: spec.yLog ? 'logarithmic' : 'linear',
          min: spec.yMin,
          max: spec.yMax,
          title: { display: true, text: spec.yLabel, font: { size: TEXT.axis } },
          ticks: {
            font: { size: TEXT.tick },
            autoSkip: false,
            callback: spec.yLog ? (v: number | string) => formatLogTick(Number(v)) : (v: number | string, _i: number, all: { value: number }[]) => formatTick(Number(v), all.map((t) => t.value)),
          },
          grid: { color: '#e4e4e4' },
          // chart.js's own log ticks label every mantissa and crowd the axis: use decades (or 1-2-5).
          // Linear axes: round values only, so 0 is a tick whenever the range spans it.
          afterBuildTicks: spec.yLog ? (scale: Scale) => void (scale.ticks = logTicks(scale.min, scale.max).map((value) => ({ value }))) : (scale: Scale) => void (scale.ticks = niceTicks(scale.min, scale.max, 6).map((value) => ({ value }))),
          afterFit: (scale: { width: number }) => void (scale.width = Y_AXIS_WIDTH),
        },
      },
    },
    plugins: [overlayPlugin(spec)],
  };
  const chart = new Chart<'line'>(region.canvas as unknown as HTMLCanvasElement, config);
  chart.destroy();
  ctx.save();
  if (spec.title) {
    ctx.font = `bold ${TEXT.body}px "${FONT_FAMILY}"`;
    ctx.fillStyle = '#000000';
    ctx.textBaseline = 'top';
    ctx.textAlign = 'left';
    ctx.fillText(spec.title, 4, 2);
  }
  if (showLegend) drawLegend(ctx, entries, 48, top + (TEXT.small + 5) / 2, region.width - 50);
  ctx.restore();
}

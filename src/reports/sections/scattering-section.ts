/**
 * Disordered-melt scattering fits: per file, I(q) with error bars against the RPA model and
 * the normalised residuals, and the profile likelihood of χN with its 68.3 % and 95 %
 * intervals; for a temperature series, χN against T with the fitted line, its one-sigma band
 * and the predicted transition temperatures.
 */
import type { ReportPage } from '../document.js';
import { drawLineChart } from '../charts/line-chart.js';
import { drawInSubRegion } from '../region.js';
import type { ReportInput } from '../report-inputs.js';
import type { ScatteringReportInput } from '../scattering-input.js';
import { CONTENT_WIDTH } from '../style.js';
import { sig } from '../format.js';
import type { ReportSection } from './section.js';

function filePage(f: ScatteringReportInput['fits'][number], k: number, qLabel: string): ReportPage {
  const qMin = Math.min(...f.q);
  const qMax = Math.max(...f.q);
  return {
    heading: `Scattering fit: ${f.label}`,
    blocks: [
      {
        type: 'figure',
        id: `scattering-fit-${k}`,
        width: CONTENT_WIDTH,
        height: 290,
        caption: `Figure: measured I(q)${f.dI ? ' with one-σ error bars' : ''} and the RPA model at χN = ${sig(f.chiN, 5)}; beneath, residuals (data − model)/σ, which should scatter within ±2 if the model and σ are right.`,
        draw(region) {
          const topH = region.height * 0.64;
          drawInSubRegion(region, 0, 0, region.width, topH, (r) =>
            drawLineChart(r, {
              series: [
                { label: 'RPA model', style: 0, points: f.q.map((q, i) => ({ x: q, y: f.model[i] })) },
                { label: f.dI ? 'data ± σ' : 'data', style: 1, line: false, markers: true, points: f.q.map((q, i) => ({ x: q, y: f.I[i] })), ...(f.dI ? { errorBars: f.dI } : {}) },
              ],
              xLabel: qLabel,
              yLabel: 'I (data units)',
              xMin: qMin,
              xMax: qMax,
            }),
          );
          drawInSubRegion(region, 0, topH, region.width, region.height - topH, (r) =>
            drawLineChart(r, {
              series: [{ label: 'normalised residual', style: 1, line: false, markers: true, points: f.q.map((q, i) => ({ x: q, y: f.normalisedResidual[i] })) }],
              xLabel: qLabel,
              yLabel: 'residual / σ',
              legend: false,
              xMin: qMin,
              xMax: qMax,
              guides: [{ axis: 'y', value: 0, style: 0 }],
            }),
          );
        },
      },
      {
        type: 'figure',
        id: `scattering-profile-${k}`,
        width: CONTENT_WIDTH,
        height: 200,
        caption: `Figure: profile likelihood Δχ²(χN), Rg, K and the background minimised at each χN; shaded the 68.3 % interval [${sig(f.interval[0], 5)}, ${sig(f.interval[1], 5)}], guides at the 95 % ends [${sig(f.interval95[0], 5)}, ${sig(f.interval95[1], 5)}].`,
        draw: (r) =>
          drawLineChart(r, {
            series: [{ label: 'Δχ²', style: 0, markers: true, points: f.profile.map((p) => ({ x: p.chiN, y: p.deltaChi2 })) }],
            xLabel: 'χN (–)',
            yLabel: 'Δχ² (–)',
            legend: false,
            band: { from: f.interval[0], to: f.interval[1] },
            guides: [
              { axis: 'y', value: f.threshold68, style: 1 },
              { axis: 'x', value: f.interval95[0], label: '95 %', style: 2 },
              { axis: 'x', value: f.interval95[1], style: 2 },
            ],
          }),
      },
    ],
  };
}

function seriesPage(s: NonNullable<ScatteringReportInput['series']>): ReportPage {
  return {
    heading: 'χ(T) from the temperature series',
    blocks: [
      {
        type: 'figure',
        id: 'scattering-chi-of-t',
        width: CONTENT_WIDTH,
        height: 300,
        caption: `Figure: χN at each temperature with its 68.3 % interval (error bars, half-width shown symmetric), the fitted line ${s.summary} and its one-sigma band, and the predicted transition temperatures: ${s.transitions.map((t) => `${t.label}: ${sig(t.T, 4)} K`).join('; ')}.`,
        draw: (r) =>
          drawLineChart(r, {
            series: [
              { label: 'a/T + b', style: 0, points: s.band.map((p) => ({ x: p.T, y: p.chiN })) },
              { label: '± 1 sd', style: 2, points: s.band.map((p) => ({ x: p.T, y: p.chiN + p.sd })) },
              { label: '', style: 2, points: s.band.map((p) => ({ x: p.T, y: p.chiN - p.sd })) },
              { label: 'fitted χN', style: 1, line: false, markers: true, points: s.points.map((p) => ({ x: p.T, y: p.chiN })), errorBars: s.points.map((p) => (p.hi - p.lo) / 2) },
            ],
            xLabel: 'T / K',
            yLabel: 'χN (–)',
            guides: s.transitions.filter((t) => t.T > 0).map((t, i) => ({ axis: 'x' as const, value: t.T, label: `${sig(t.T, 4)} K`, style: i + 1 })),
          }),
      },
    ],
  };
}

export const scatteringSection: ReportSection = {
  id: 'scattering',
  pages: (input: ReportInput) => {
    const s = input.scattering;
    if (!s) return [];
    return [...s.fits.map((f, k) => filePage(f, k, s.qLabel)), ...(s.series ? [seriesPage(s.series)] : [])];
  },
};

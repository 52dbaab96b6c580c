/**
 * χN inversion: the data with error bars against the fitted profile, the normalised
 * residuals, the profile likelihood of χN with the interval marked, and the estimators.
 */
import { InputError } from '../../io/errors.js';
import type { ReportPage } from '../document.js';
import { drawLineChart } from '../charts/line-chart.js';
import { drawInSubRegion } from '../region.js';
import type { InversionInput, ReportInput } from '../report-inputs.js';
import { CONTENT_WIDTH } from '../style.js';
import { sig } from '../format.js';
import type { ReportSection } from './section.js';

function checkInversion(v: InversionInput): void {
  if (v.data.length === 0) throw new InputError('inversion.data: got no data points; an inversion report needs the measured profile');
  const bad = v.data.findIndex((d) => !(d.sigma > 0));
  if (bad >= 0) throw new InputError(`inversion.data[${bad}].sigma: got ${v.data[bad].sigma}; allowed: a standard deviation > 0`);
  if (v.profileLikelihood.length < 2) throw new InputError('inversion.profileLikelihood: needs at least two (χN, Δχ²) points');
}

function inversionPage(v: InversionInput): ReportPage {
  checkInversion(v);
  const q = v.quantity;
  const { lower, upper, level, threshold } = v.interval;
  const profile = [...v.profileLikelihood].sort((a, b) => a.chiN - b.chiN);
  return {
    heading: 'Inversion: χN from a measured profile',
    blocks: [
      {
        type: 'figure',
        id: 'inversion-fit',
        width: CONTENT_WIDTH,
        height: 290,
        caption: `Figure: measured ${q} with one-σ error bars (${v.data.length} points) and the profile at the best fit χN = ${sig(v.bestChiN, 6)}; beneath, residuals (data − fit)/σ, which should scatter within ±2 if the model and σ are right.`,
        draw(region) {
          const topH = region.height * 0.64;
          // One x range for both panels, so residuals sit under their data points.
          const xs = [...v.data.map((d) => d.x), ...v.fitted.map((p) => p.x)];
          const xMin = Math.min(...xs);
          const xMax = Math.max(...xs);
          drawInSubRegion(region, 0, 0, region.width, topH, (r) =>
            drawLineChart(r, {
              series: [
                { label: `${q} fitted`, style: 0, points: v.fitted.map((p) => ({ x: p.x, y: p.value })) },
                { label: `${q} data ± σ`, style: 1, line: false, markers: true, points: v.data.map((d) => ({ x: d.x, y: d.value })), errorBars: v.data.map((d) => d.sigma) },
              ],
              xLabel: 'x / Rg',
              yLabel: `${q} (–)`,
              xMin,
              xMax,
            }),
          );
          drawInSubRegion(region, 0, topH, region.width, region.height - topH, (r) =>
            drawLineChart(r, {
              series: [{ label: 'normalised residual', style: 1, line: false, markers: true, points: v.residuals.map((p) => ({ x: p.x, y: p.normalized })) }],
              xLabel: 'x / Rg',
              yLabel: 'residual / σ',
              legend: false,
              xMin,
              xMax,
              guides: [{ axis: 'y', value: 0, style: 0 }],
            }),
          );
        },
      },
      {
        type: 'figure',
        id: 'inversion-profile-likelihood',
        width: CONTENT_WIDTH,
        height: 220,
        caption: `Figure: profile likelihood Δχ²(χN); the ${Math.round(level * 100)} % interval is where Δχ² < ${sig(threshold, 4)} (shaded): χN ∈ [${sig(lower, 6)}, ${sig(upper, 6)}].`,
        draw: (r) =>
          drawLineChart(r, {
            series: [{ label: 'Δχ²', style: 0, markers: true, points: profile.map((p) => ({ x: p.chiN, y: p.deltaChi2 })) }],
            xLabel: 'χN (–)',
            yLabel: 'Δχ² (–)',
            legend: false,
            band: { from: lower, to: upper },
            guides: [
              { axis: 'y', value: threshold, label: `Δχ² = ${sig(threshold, 4)}`, style: 1 },
              { axis: 'x', value: v.bestChiN, label: `best χN = ${sig(v.bestChiN, 5)}`, style: 2 },
            ],
          }),
      },
      {
        type: 'table',
        header: ['estimator', 'χN', 'lower', 'upper', 'note'],
        widths: [3.4, 1.1, 1.1, 1.1, 2.8],
        alignRight: [1, 2, 3],
        rows: v.estimators.map((e) => [e.name, sig(e.chiN, 6), sig(e.lower, 6), sig(e.upper, 6), e.note ?? '']),
      },
    ],
  };
}

export const inversionSection: ReportSection = {
  id: 'inversion',
  pages: (input: ReportInput) => (input.inversion ? [inversionPage(input.inversion)] : []),
};

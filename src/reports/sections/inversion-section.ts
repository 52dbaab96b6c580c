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

/** A symmetric residual axis on round values, so that 0 and ±2 are ticks. */
function residualLimit(v: InversionInput): number {
  const m = Math.max(2, ...v.residuals.map((r) => Math.abs(r.normalized)));
  return m <= 3 ? 3 : m <= 4 ? 4 : Math.ceil(m / 2) * 2;
}

function inversionPage(v: InversionInput): ReportPage {
  checkInversion(v);
  const q = v.quantity;
  const { lower, upper, level, threshold } = v.interval;
  const profile = [...v.profileLikelihood].sort((a, b) => a.chiN - b.chiN);
  const nm = v.xUnit === 'nm' && v.rgNm !== undefined;
  const xLabel = nm ? 'x / nm' : 'x / Rg';
  const topAxis = nm ? { label: 'x / Rg', scale: 1 / v.rgNm! } : undefined;
  const lim = residualLimit(v);
  const i95 = v.interval95;
  return {
    heading: 'Inversion: χN from a measured profile',
    blocks: [
      {
        type: 'figure',
        id: 'inversion-fit',
        width: CONTENT_WIDTH,
        height: 290,
        caption: `Figure: measured ${q} with one-σ error bars (${v.data.length} points) and the profile at the best fit χN = ${sig(v.bestChiN, 5)}, against position in the data's units (${nm ? `nm; Rg = ${sig(v.rgNm!, 4)} nm on the top axis` : 'Rg'}); beneath, residuals (data − fit)/σ, which should scatter within ±2 if the model and σ are right.`,
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
              xLabel,
              yLabel: `${q} (–)`,
              xMin,
              xMax,
              topAxis,
            }),
          );
          drawInSubRegion(region, 0, topH, region.width, region.height - topH, (r) =>
            drawLineChart(r, {
              series: [{ label: 'normalised residual', style: 1, line: false, markers: true, points: v.residuals.map((p) => ({ x: p.x, y: p.normalized })) }],
              xLabel,
              yLabel: 'residual / σ',
              legend: false,
              xMin,
              xMax,
              yMin: -lim,
              yMax: lim,
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
        caption: `Figure: profile likelihood Δχ²(χN), the other parameters minimised at each χN; the ${Math.round(level * 100)} % interval is where Δχ² < ${sig(threshold, 3)} (dark band): χN ∈ [${sig(lower, 5)}, ${sig(upper, 5)}]${i95 ? `; the 95 % interval where Δχ² < ${sig(i95.threshold, 3)} (light band): χN ∈ [${sig(i95.lower, 5)}, ${sig(i95.upper, 5)}]` : ''}.`,
        draw: (r) =>
          drawLineChart(r, {
            series: [{ label: 'Δχ²', style: 0, markers: true, points: profile.map((p) => ({ x: p.chiN, y: p.deltaChi2 })) }],
            xLabel: 'χN (–)',
            yLabel: 'Δχ² (–)',
            legend: false,
            band: { from: lower, to: upper },
            ...(i95 ? { outerBand: { from: i95.lower, to: i95.upper } } : {}),
            guides: [
              { axis: 'y', value: threshold, label: `Δχ² = ${sig(threshold, 3)}`, style: 1 },
              ...(i95 ? [{ axis: 'y' as const, value: i95.threshold, label: `Δχ² = ${sig(i95.threshold, 3)} (95 %)`, style: 3 }] : []),
              { axis: 'x', value: v.bestChiN, label: `best χN = ${sig(v.bestChiN, 5)}`, style: 2 },
            ],
          }),
      },
      {
        type: 'table',
        header: ['estimator', 'χN', `lower (${Math.round(level * 100)} %)`, `upper (${Math.round(level * 100)} %)`, 'how the interval was found'],
        widths: [1.6, 0.9, 1.4, 1.4, 4.7],
        alignRight: [1, 2, 3],
        rows: v.estimators.map((e) => [e.name, sig(e.chiN, 5), sig(e.lower, 5), sig(e.upper, 5), e.note ?? '']),
      },
    ],
  };
}

export const inversionSection: ReportSection = {
  id: 'inversion',
  pages: (input: ReportInput) => (input.inversion ? [inversionPage(input.inversion)] : []),
};

/**
 * Film fit: the measured depth profile or reflectivity against the fitted film model (R(Q) on a
 * log axis and as R·Q⁴, which takes out the Fresnel fall-off so that the fringes show), the
 * normalised residuals, the profile likelihoods of χN and the wall affinities, and a table of
 * the fitted values with their 95 % intervals.
 */
import type { Block, ReportPage } from '../document.js';
import { drawLineChart } from '../charts/line-chart.js';
import { drawInSubRegion } from '../region.js';
import type { FilmFitInput, ReportInput } from '../report-inputs.js';
import { CONTENT_WIDTH } from '../style.js';
import { sig } from '../format.js';
import type { ReportSection } from './section.js';

function dataFigure(v: FilmFitInput) {
  const refl = v.dataKind === 'reflectivity';
  const d = v.data;
  const xMin = Math.min(...d.map((p) => p.x));
  const xMax = Math.max(...d.map((p) => p.x));
  return {
    type: 'figure' as const,
    id: 'film-fit-data',
    width: CONTENT_WIDTH,
    height: refl ? 360 : 290,
    caption: refl
      ? `Figure: measured R(Q) with one-σ error bars (${d.length} points) and the fitted film (layers ${v.layers}), on a log axis and as R·Q⁴ (Å⁻⁴); beneath, residuals (data − fit)/σ. Reduced χ² ${sig(v.reducedChi2, 4)}.`
      : `Figure: measured ${v.yLabel} with one-σ error bars (${d.length} points) and the fitted film (layers ${v.layers}); beneath, residuals (data − fit)/σ. Reduced χ² ${sig(v.reducedChi2, 4)}.`,
    draw(region: Parameters<typeof drawInSubRegion>[0]) {
      const panels: [number, (r: Parameters<typeof drawLineChart>[0]) => void][] = [];
      const series = (y: (p: FilmFitInput['data'][number]) => number, e: (p: FilmFitInput['data'][number]) => number) => [
        { label: 'fit', style: 0, points: d.map((p) => ({ x: p.x, y: y({ ...p, value: p.fit }) })) },
        { label: 'data ± σ', style: 1, line: false, markers: true, points: d.map((p) => ({ x: p.x, y: y(p) })), errorBars: d.map(e) },
      ];
      if (refl) {
        panels.push([0.4, (r) => drawLineChart(r, { series: series((p) => p.value, (p) => p.sigma), xLabel: v.xLabel, yLabel: 'R (–)', yLog: true, xMin, xMax })]);
        panels.push([0.35, (r) => drawLineChart(r, { series: series((p) => p.value * p.x ** 4, (p) => p.sigma * p.x ** 4), xLabel: v.xLabel, yLabel: 'R·Q⁴ (Å⁻⁴)', legend: false, xMin, xMax })]);
      } else panels.push([0.7, (r) => drawLineChart(r, { series: series((p) => p.value, (p) => p.sigma), xLabel: v.xLabel, yLabel: v.yLabel, xMin, xMax })]);
      const rest = 1 - panels.reduce((a, p) => a + p[0], 0);
      panels.push([rest, (r) => drawLineChart(r, { series: [{ label: 'residual', style: 1, line: false, markers: true, points: d.map((p) => ({ x: p.x, y: (p.value - p.fit) / p.sigma })) }], xLabel: v.xLabel, yLabel: 'residual / σ', legend: false, xMin, xMax, guides: [{ axis: 'y', value: 0, style: 0 }] })]);
      let top = 0;
      for (const [share, draw] of panels) {
        drawInSubRegion(region, 0, top, region.width, region.height * share, draw);
        top += region.height * share;
      }
    },
  };
}

function filmFitPage(v: FilmFitInput): ReportPage {
  const blocks: Block[] = [dataFigure(v)];
  for (const pr of v.profiles) {
    const par = v.parameters.find((p) => p.name === pr.name);
    if (pr.points.length < 2 || !par) continue;
    blocks.push({
      type: 'figure',
      id: `film-fit-profile-${pr.name}`,
      width: CONTENT_WIDTH,
      height: 170,
      caption: `Figure: profile likelihood of ${pr.name} (every other parameter refitted at each value); the 95 % interval is where Δχ² < ${sig(pr.threshold, 4)}${par.lower !== undefined ? `: [${sig(par.lower, 5)}, ${sig(par.upper!, 5)}] ${par.unit}` : ''}.`,
      draw: (r) =>
        drawLineChart(r, {
          series: [{ label: 'Δχ²', style: 0, markers: true, points: pr.points.map((p) => ({ x: p.value, y: p.deltaChi2 })) }],
          xLabel: `${pr.name} (${par.unit})`,
          yLabel: 'Δχ² (–)',
          legend: false,
          ...(par.lower !== undefined ? { band: { from: par.lower, to: par.upper! } } : {}),
          guides: [{ axis: 'y', value: pr.threshold, label: `Δχ² = ${sig(pr.threshold, 4)}`, style: 1 }],
        }),
    });
  }
  blocks.push({
    type: 'table',
    header: ['parameter', 'best fit', '95 % lower', '95 % upper', 'unit'],
    widths: [2.6, 1.4, 1.4, 1.4, 2.2],
    alignRight: [1, 2, 3],
    rows: v.parameters.map((p) => [p.name, sig(p.value, 5), p.lower !== undefined ? sig(p.lower, 5) : '–', p.upper !== undefined ? sig(p.upper, 5) : '–', p.unit]),
  });
  if (v.warnings.length) blocks.push({ type: 'text', lines: v.warnings.map((w) => `Warning: ${w}`) });
  return { heading: v.dataKind === 'reflectivity' ? 'Film fit: χN and wall affinities from reflectivity' : 'Film fit: χN and wall affinities from a depth profile', blocks };
}

export const filmFitSection: ReportSection = {
  id: 'film-fit',
  pages: (input: ReportInput) => (input.filmFit ? [filmFitPage(input.filmFit)] : []),
};

/** Training curves: every loss term against step (log axis), the learning rate, and for inverse runs the χN trajectory. */
import { InputError } from '../../io/errors.js';
import type { Block, ReportPage } from '../document.js';
import { drawLineChart } from '../charts/line-chart.js';
import type { LineSeries } from '../charts/line-chart.js';
import type { ReportInput, TrainingInput } from '../report-inputs.js';
import { CONTENT_WIDTH } from '../style.js';
import { sig, sci } from '../format.js';
import type { ReportSection } from './section.js';

function lossTerms(t: TrainingInput): string[] {
  const names = new Set<string>();
  for (const h of t.history) for (const k of Object.keys(h.terms)) names.add(k);
  return [...names];
}

function trainingPage(t: TrainingInput): ReportPage {
  if (t.history.length === 0 && !t.chiNTrajectory?.length) throw new InputError('training.history: got an empty loss history; a training report needs at least one logged step');
  const terms = lossTerms(t);
  // A log axis cannot show zero or negative values: drop them from the curve and say so.
  let dropped = 0;
  const lossSeries: LineSeries[] = terms.map((name, k) => ({
    label: name,
    style: k,
    points: t.history.flatMap((h) => {
      const v = h.terms[name];
      if (v === undefined) return [];
      if (!(v > 0)) {
        dropped++;
        return [];
      }
      return [{ x: h.step, y: v }];
    }),
  }));
  const last = t.history[t.history.length - 1];
  // Inverse runs may carry only the χN trajectory (no loss history): then only that figure.
  const blocks: Block[] = !last ? [] : [
    {
      type: 'figure',
      id: 'training-loss',
      width: CONTENT_WIDTH,
      height: 250,
      caption: `Figure: each loss term against optimisation step (log axis), ${t.history.length} logged steps; at step ${last.step}: ${terms.map((n) => `${n} = ${sci(last.terms[n])}`).join(', ')}.${dropped ? ` ${dropped} non-positive values are not drawn on the log axis.` : ''}`,
      draw: (r) => drawLineChart(r, { series: lossSeries, xLabel: 'step', yLabel: 'loss term (–)', yLog: true, legend: true }),
    },
    {
      type: 'figure',
      id: 'training-lr',
      width: CONTENT_WIDTH,
      height: t.chiNTrajectory ? 150 : 190,
      caption: 'Figure: learning rate against step (log axis).',
      draw: (r) => drawLineChart(r, { series: [{ label: 'learning rate', style: 2, points: t.history.filter((h) => h.lr > 0).map((h) => ({ x: h.step, y: h.lr })) }], xLabel: 'step', yLabel: 'learning rate', yLog: true, legend: false }),
    },
  ];
  if (t.chiNTrajectory?.length) {
    const traj = t.chiNTrajectory;
    const ref = t.chiNReference;
    blocks.push({
      type: 'figure',
      id: 'training-chiN',
      width: CONTENT_WIDTH,
      height: 170,
      caption: `Figure: the trainable χN against step; final χN = ${sig(traj[traj.length - 1].chiN, 6)}${ref ? `, ${ref.label} = ${sig(ref.value, 6)} (dashed line)` : ''}.`,
      draw: (r) =>
        drawLineChart(r, {
          series: [{ label: 'χN (trained)', style: 0, points: traj.map((p) => ({ x: p.step, y: p.chiN })) }],
          xLabel: 'step',
          yLabel: 'χN (–)',
          legend: false,
          guides: ref ? [{ axis: 'y', value: ref.value, label: `${ref.label} = ${sig(ref.value, 5)}`, style: 1 }] : [],
        }),
    });
  }
  return { heading: 'Training', blocks };
}

export const trainingSection: ReportSection = {
  id: 'training',
  pages: (input: ReportInput) => (input.training ? [trainingPage(input.training)] : []),
};

/**
 * Training: the loss (and the φA error against the reference, where measured) over every
 * phase of the run — warm start, Adam, L-BFGS, and any later phase — against iterations and
 * against wall time, with the phase boundaries marked; for inverse runs, the χN trajectory.
 */
import { InputError } from '../../io/errors.js';
import type { Block, ReportPage } from '../document.js';
import { drawLineChart } from '../charts/line-chart.js';
import type { GuideLine, LineSeries } from '../charts/line-chart.js';
import { drawInSubRegion } from '../region.js';
import type { ReportInput, TrainingInput, TrainingRecord } from '../report-inputs.js';
import { CONTENT_WIDTH } from '../style.js';
import { duration, sci, sig } from '../format.js';
import type { ReportSection } from './section.js';

const PHASE_STYLE: Record<string, number> = { 'warm start': 4, Adam: 1, 'L-BFGS': 2 };
const styleOf = (phase: string, k: number): number => PHASE_STYLE[phase] ?? 3 + (k % 3);

function curves(t: TrainingInput, x: (r: TrainingRecord) => number | undefined): LineSeries[] {
  const series: LineSeries[] = t.phases.map((p, k) => ({
    label: `loss, ${p.name}`,
    style: styleOf(p.name, k),
    points: t.records.filter((r) => r.phase === p.name && r.loss > 0 && x(r) !== undefined).map((r) => ({ x: x(r)!, y: r.loss })),
  }));
  const err = t.records.filter((r) => r.referenceError !== undefined && r.referenceError > 0 && x(r) !== undefined);
  if (err.length) series.push({ label: 'φA relative L2 error vs reference', style: 0, markers: true, points: err.map((r) => ({ x: x(r)!, y: r.referenceError! })) });
  return series;
}

/** Dotted lines where a phase starts (not the first). */
function boundaries(t: TrainingInput, at: (p: TrainingInput['phases'][number], i: number) => number | undefined): GuideLine[] {
  return t.phases.slice(1).flatMap((p, i) => {
    const v = at(p, i + 1);
    return v === undefined ? [] : [{ axis: 'x' as const, value: v, label: p.name, style: 6 }];
  });
}

function lossFigure(t: TrainingInput): Block {
  const hasWall = t.records.some((r) => r.wallSeconds !== undefined);
  const last = t.records[t.records.length - 1];
  const errs = t.records.filter((r) => r.referenceError !== undefined);
  const lastErr = errs[errs.length - 1];
  const summary = t.phases.map((p) => `${p.name}: ${p.iterations} iterations, final loss ${sci(p.finalLoss)}${p.finalReferenceError !== undefined ? `, φA error ${sci(p.finalReferenceError)}` : ''}`).join('; ');
  const timeNote = !hasWall ? '' : t.wallClock ? ' Wall time counts from the start of the run (the reference solve included).' : ' This run recorded training time only: the time axis starts at the Adam phase and the warm start is not on it.';
  return {
    type: 'figure',
    id: 'training-loss',
    width: CONTENT_WIDTH,
    height: hasWall ? 400 : 230,
    caption: `Figure: the loss each phase minimises against iterations over all phases (top)${hasWall ? ' and against wall time (bottom)' : ''}, log axis; dotted lines mark where a phase starts. The phases minimise different objectives (the warm start fits the reference solution; Adam and L-BFGS the SCFT residual loss), so the curve may jump at a boundary. ${summary}. Last iteration: ${last.iteration}${lastErr ? `; last φA error ${sci(lastErr.referenceError)} at iteration ${lastErr.iteration}` : ''}.${timeNote}`,
    draw(region) {
      const h = hasWall ? region.height / 2 : region.height;
      drawInSubRegion(region, 0, 0, region.width, h, (r) =>
        drawLineChart(r, { series: curves(t, (rec) => rec.iteration), xLabel: 'iteration (all phases)', yLabel: 'loss, error (–)', yLog: true, legend: true, guides: boundaries(t, (p, i) => t.phases[i - 1].to) }),
      );
      if (hasWall)
        drawInSubRegion(region, 0, h, region.width, h, (r) =>
          drawLineChart(r, { series: curves(t, (rec) => rec.wallSeconds), xLabel: t.wallClock ? 'wall time since the run started (s)' : 'training time (s)', yLabel: 'loss, error (–)', yLog: true, legend: false, guides: boundaries(t, (p, i) => t.phases[i - 1].wallTo) }),
        );
    },
  };
}

function trainingPage(t: TrainingInput): ReportPage {
  if (t.records.length === 0 && !t.chiNTrajectory?.length) throw new InputError('training.history: got an empty history; a training report needs at least one recorded iteration');
  const blocks: Block[] = [];
  if (t.records.length) {
    const total = t.phases.map((p) => `${p.name} (${p.iterations} iterations${p.wallFrom !== undefined && p.wallTo !== undefined ? `, ${duration(p.wallTo - p.wallFrom)}` : ''})`).join(', then ');
    blocks.push({ type: 'text', lines: [`Phases of this run: ${total}.`] });
    blocks.push(lossFigure(t));
  }
  if (t.chiNTrajectory?.length) {
    const traj = t.chiNTrajectory;
    const ref = t.chiNReference;
    blocks.push({
      type: 'figure',
      id: 'training-chiN',
      width: CONTENT_WIDTH,
      height: 170,
      caption: `Figure: the network estimator's χN at each of its steps (the least-squares strategy's cycles, the first two with χN held; the adam-lbfgs strategy's Adam steps and L-BFGS iterations at each field/χN update); final χN = ${sig(traj[traj.length - 1].chiN, 6)}${ref ? `, ${ref.label} = ${sig(ref.value, 6)} (dashed line)` : ''}.`,
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
  // An inversion has no loss history here: its page is the network estimator's χN alone.
  return { heading: t.records.length ? 'Training: loss over every phase' : 'Network estimator: χN over its steps', blocks };
}

export const trainingSection: ReportSection = {
  id: 'training',
  pages: (input: ReportInput) => (input.training ? [trainingPage(input.training)] : []),
};

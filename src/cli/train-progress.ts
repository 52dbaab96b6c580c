/**
 * The whole-run progress of a network training (warm start, Adam, L-BFGS, second order), as
 * the hooks trainRun takes: `train` and `demo` print the same lines, with rate and time left
 * for the whole run (cli/progress.ts RunProgress).
 */
import type { TrainConfig } from '../io/schemas/train-config.js';
import type { TrainRunOptions } from '../training/train-run.js';
import { Progress, RunProgress } from './progress.js';

type Hooks = Pick<TrainRunOptions, 'onStage' | 'onWarmStart' | 'onSecondOrder' | 'onLbfgs' | 'onProgress'>;

export function formatLoss(v: number): string {
  return Number.isFinite(v) ? v.toExponential(2) : String(v);
}

/** Hooks for trainRun that report to `progress`; `resuming`: the run continues a checkpoint (no warm start). */
export function trainProgressHooks(progress: Progress, config: TrainConfig, resuming = false): Hooks {
  const fmt = formatLoss;
  const tr = config.training;
  let resumedStep = 0;
  // A phase may end early (a target reached), never run longer.
  const run = new RunProgress(progress, [
    { name: 'warm start', units: config.warmStart.type !== 'none' && !config.initFrom && !resuming ? config.warmStart.adamSteps : 0, unit: 'steps' },
    { name: 'Adam', units: tr.adamSteps, unit: 'steps' },
    { name: 'L-BFGS', units: tr.lbfgsIterations, unit: 'iterations' },
    { name: 'second order', units: tr.secondOrderIterations, unit: 'iterations' },
  ]);
  const prop = config.networks.propagator;
  // Soft constraints are shown only when chosen (they are an exact 0 otherwise).
  const soft = (t: { periodicity: number; initial: number }) =>
    `${prop.periodicity === 'soft' ? `, per ${fmt(t.periodicity)}` : ''}${prop.initialCondition === 'soft' ? `, ic ${fmt(t.initial)}` : ''}`;
  return {
    onStage: (m) => {
      // A resumed run's Adam steps count from its checkpoint's step: the rate is of the steps run now.
      const resumed = /^resumed from .* at step (\d+)$/.exec(m);
      if (resumed) resumedStep = Number(resumed[1]);
      // The reference solve and the backend's start-up come first, outside every phase's clock.
      // Each phase's clock starts with its stage message, so its first report already has a rate.
      if (m.startsWith('warm start')) run.begin('warm start');
      else if (m.startsWith('training (')) run.begin('Adam', resumedStep);
      else if (m.startsWith('L-BFGS polish')) run.begin('L-BFGS');
      else if (m.startsWith('second-order phase')) run.begin('second order');
      progress.update(m, true);
    },
    onWarmStart: (step, steps, loss) => run.at('warm start', step, `loss ${fmt(loss)}`, step === steps),
    onSecondOrder: (p) => run.at('second order', p.iteration, `loss ${fmt(p.loss)} | μ ${fmt(p.mu)}${p.phiError !== undefined ? ` | φA error ${fmt(p.phiError)}` : ''}`, p.iteration === p.iterations),
    onLbfgs: (it, its, loss) => run.at('L-BFGS', it, `loss ${fmt(loss)}`, it === its),
    onProgress: (p) =>
      run.at(
        'Adam',
        p.step,
        `loss ${fmt(p.total)} (mde ${fmt(p.terms.mde)}${soft(p.terms)}, incomp ${fmt(p.terms.incompressibility)}, sc ${fmt(p.terms.selfConsistency)}, gauge ${fmt(p.terms.gauge)})`,
        p.step === p.steps,
      ),
  };
}

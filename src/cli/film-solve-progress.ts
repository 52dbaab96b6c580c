/**
 * The progress line of a film solve (reflectivity's R(Q) of a film, which takes minutes on the
 * default grid): which start, its iteration and residual, the rate, and the time left for the
 * whole solve. The solve tries the disordered film (a Newton continuation, counted in stages)
 * and then a few lamellar starts (field iterations, each up to its iteration limit).
 *
 * The time left is an estimate, shown with "~": the current start's remaining iterations from
 * how fast its residual has been falling (ln residual falls about linearly with the iteration
 * near convergence under Anderson mixing: common practice, no source), capped by its limit;
 * each later start at as many iterations as the current one is expected to take, at the
 * current start's rate. During the disordered film (another unit) the lamellar starts are
 * named, not timed.
 */
import type { FilmSolveStep } from '../spectral/film-solve.js';
import { formatDuration, formatRate } from './progress.js';

/** How many recent reports the residual's rate of fall is measured over. */
const WINDOW = 12;

export class FilmSolveProgress {
  private start = 0;
  private firstAt = 0;
  private firstIteration = 0;
  private recent: { iteration: number; lnResidual: number }[] = [];

  /** The line for this step (without the command's label). */
  line(step: FilmSolveStep, now = performance.now()): string {
    if (step.start !== this.start) {
      this.start = step.start;
      this.firstAt = now;
      this.firstIteration = step.iteration;
      this.recent = [];
    }
    this.recent.push({ iteration: step.iteration, lnResidual: Math.log(step.residual) });
    if (this.recent.length > WINDOW) this.recent.shift();
    const disordered = step.start === 1;
    const unit = disordered ? 'steps' : 'iterations';
    const head = `film solve: start ${step.start}/${step.starts} (${step.label}), ${disordered ? 'step' : 'iteration'} ${step.iteration} | residual ${step.residual.toExponential(2)} kT (tolerance ${step.tolerance.toExponential(0)})`;
    const seconds = (now - this.firstAt) / 1000;
    const rate = step.iteration > this.firstIteration && seconds > 0 ? (step.iteration - this.firstIteration) / seconds : Number.NaN;
    if (!Number.isFinite(rate)) return `${head} | rate and time left: measuring`;
    const later = step.starts - step.start;
    if (disordered) return `${head} | ${formatRate(rate)} ${unit}/s | time left: after the disordered film${later > 0 ? `, then ${later} lamellar start(s) not yet timed` : ''}`;
    const remaining = this.remainingIterations(step);
    const expected = step.iteration + remaining;
    const left = (remaining + later * expected) / rate;
    return `${head} | ${formatRate(rate)} ${unit}/s | ~${formatDuration(left)} left (whole solve${later > 0 ? `, ${later} more start(s)` : ''})`;
  }

  /** This start's iterations still to go: from the residual's rate of fall, at most up to its limit. */
  private remainingIterations(step: FilmSolveStep): number {
    const cap = Math.max(0, step.maxIterations - step.iteration);
    if (step.residual <= step.tolerance) return 0;
    const first = this.recent[0];
    const last = this.recent[this.recent.length - 1];
    const fall = last.iteration > first.iteration ? (first.lnResidual - last.lnResidual) / (last.iteration - first.iteration) : Number.NaN;
    if (!(fall > 0)) return cap;
    return Math.min(cap, Math.ceil((last.lnResidual - Math.log(step.tolerance)) / fall));
  }
}

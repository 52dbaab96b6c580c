/**
 * The film solve's progress line (src/cli/film-solve-progress.ts): its time left against the
 * same estimate worked out by hand for a residual that falls exactly exponentially,
 * r(k) = exp(−a·k) (then ln r is linear in k and the estimate is exact, not a fit).
 */
import { describe, expect, it } from 'vitest';
import { FilmSolveProgress } from '../../src/cli/film-solve-progress.js';
import type { FilmSolveStep } from '../../src/spectral/film-solve.js';

const a = 0.1;
const tolerance = 1e-9;
const step = (start: number, iteration: number, maxIterations = 2000): FilmSolveStep => ({ start, starts: 4, label: 'a start with 5 half-periods', iteration, maxIterations, residual: Math.exp(-a * iteration), tolerance });

describe('film solve progress', () => {
  it('time left: the current start to the tolerance at the residual\'s rate of fall, and each later start as long, at the measured rate', () => {
    const p = new FilmSolveProgress();
    // Start 2 of 4 reports iterations 1, 10, 20, …, 100 at 10 iterations per second (t = (k − 1)/10 s).
    let line = '';
    for (const k of [1, 10, 20, 30, 40, 50, 60, 70, 80, 90, 100]) line = p.line(step(2, k), ((k - 1) / 10) * 1000);
    // By hand: ln r(100) = −10, ln 1e-9 = −20.723; (−10 + 20.723)/0.1 = 107.2 → 108 iterations to go,
    // the start then takes 208; two later starts as long: (108 + 2·208) iterations at 10 per second = 52.4 s.
    expect(line).toContain('start 2/4 (a start with 5 half-periods), iteration 100 | residual 4.54e-5 kT (tolerance 1e-9)');
    expect(line).toContain('| 10 iterations/s | ~52.4 s left (whole solve, 2 more start(s))');
  });

  it('a start that stalls is counted to its iteration limit', () => {
    const p = new FilmSolveProgress();
    const flat = (k: number): FilmSolveStep => ({ ...step(4, k, 400), residual: 0.5 });
    p.line(flat(1), 0);
    // 400 − 101 = 299 iterations at 10 per second, no later start.
    expect(p.line(flat(101), 10_000)).toContain('| 10 iterations/s | ~29.9 s left (whole solve)');
  });

  it('during the disordered film (another unit) the lamellar starts are named, not timed; a first report has no rate', () => {
    const p = new FilmSolveProgress();
    const dis = (k: number): FilmSolveStep => ({ ...step(1, k), label: 'the disordered film: field iterations at χN = 5.247' });
    expect(p.line(dis(1), 0)).toMatch(/rate and time left: measuring$/);
    expect(p.line(dis(21), 2000)).toMatch(/step 21 \| .* \| 10 steps\/s \| time left: after the disordered film, then 3 lamellar start\(s\) not yet timed$/);
  });
});

/**
 * L-BFGS and Levenberg–Marquardt run stepwise (numerics/stepwise.ts): the yielding drivers
 * give the same iterates as the synchronous ones, and a stop asked by an event (as a signal
 * handler asks it, from the event loop) ends the run after the current iteration. Before the
 * drivers yielded, an event could not run until the whole minimisation had returned.
 *
 * Test problems: the Rosenbrock function, minimum 0 at (1, 1) (H. H. Rosenbrock, Comput. J. 3,
 * 175 (1960)), and its least-squares form r = (10 (y − x²), 1 − x).
 */
import { describe, expect, it } from 'vitest';
import { lbfgs, lbfgsYielding } from '../../src/numerics/lbfgs.js';
import { levenbergMarquardt, levenbergMarquardtYielding } from '../../src/numerics/levenberg-marquardt.js';
import type { LeastSquaresProblem } from '../../src/numerics/levenberg-marquardt.js';

const rosenbrock = (x: Float64Array) => ({
  f: 100 * (x[1] - x[0] ** 2) ** 2 + (1 - x[0]) ** 2,
  g: [-400 * x[0] * (x[1] - x[0] ** 2) - 2 * (1 - x[0]), 200 * (x[1] - x[0] ** 2)],
});

const residuals = (x: Float64Array) => Float64Array.of(10 * (x[1] - x[0] ** 2), 1 - x[0]);
const rosenbrockLs: LeastSquaresProblem = {
  size: 2,
  cost: (x) => 0.5 * residuals(x).reduce((s, v) => s + v * v, 0),
  linearise: (x) => {
    const r = residuals(x);
    return { kind: 'dense', cost: 0.5 * (r[0] ** 2 + r[1] ** 2), m: 2, r, J: Float64Array.of(-20 * x[0], 10, -1, 0) };
  },
};

const turn = () => new Promise<void>((resolve) => setImmediate(resolve));

describe('stepwise minimisers', () => {
  it('L-BFGS: the yielding driver gives the same iterates as the synchronous one and reaches (1, 1)', async () => {
    const x0 = [-1.2, 1];
    const a = lbfgs(rosenbrock, x0, { maxIterations: 200, gradientTolerance: 1e-10 });
    const b = await lbfgsYielding(rosenbrock, x0, { maxIterations: 200, gradientTolerance: 1e-10 }, turn, () => false);
    expect(b.iterations).toBe(a.iterations);
    expect(Array.from(b.x)).toEqual(Array.from(a.x));
    expect(a.reason).toBe('gradient');
    expect(Math.abs(a.x[0] - 1)).toBeLessThan(1e-6);
    expect(Math.abs(a.x[1] - 1)).toBeLessThan(1e-6);
  });

  it('L-BFGS: a stop asked from an event after iteration 3 ends the run at iteration 3, not at the end', async () => {
    let stop = false;
    const r = await lbfgsYielding(
      rosenbrock,
      [-1.2, 1],
      { maxIterations: 200, gradientTolerance: 1e-10, onIteration: (it) => void (it.iteration === 3 && setImmediate(() => (stop = true))) },
      turn,
      () => stop,
    );
    expect(r.reason).toBe('interrupted');
    expect(r.iterations).toBe(3);
    expect(r.trajectory.length).toBe(3);
  });

  it('Levenberg–Marquardt: same iterates either way; a stop from an event ends it after that iteration', async () => {
    const a = levenbergMarquardt(rosenbrockLs, Float64Array.of(-1.2, 1), { maxIterations: 100, gradientTolerance: 1e-12 });
    const b = await levenbergMarquardtYielding(rosenbrockLs, Float64Array.of(-1.2, 1), { maxIterations: 100, gradientTolerance: 1e-12 }, turn, () => false);
    expect(b.iterations).toBe(a.iterations);
    expect(Array.from(b.x)).toEqual(Array.from(a.x));
    expect(Math.abs(a.x[0] - 1)).toBeLessThan(1e-6);
    let stop = false;
    const seen: number[] = [];
    const c = await levenbergMarquardtYielding(
      rosenbrockLs,
      Float64Array.of(-1.2, 1),
      { maxIterations: 100, gradientTolerance: 1e-12, onIteration: (it) => void (seen.push(it.iteration), it.iteration === 2 && setImmediate(() => (stop = true))) },
      turn,
      () => stop,
    );
    expect(c.reason).toBe('interrupted');
    expect(c.iterations).toBe(2);
    expect(seen).toEqual([1, 2]);
  });
});

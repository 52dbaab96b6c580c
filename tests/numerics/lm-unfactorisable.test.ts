/**
 * Levenberg–Marquardt (numerics/levenberg-marquardt.ts) when a damped system does not
 * factorise: the step counts as rejected and μ grows (Madsen, Nielsen & Tingleff, "Methods for
 * non-linear least squares problems", 2004, Algorithm 3.16: a step that does not reduce the cost
 * raises μ), instead of the factorisation's exception ending the fit.
 * The problem: r(x) = (x₀ − 1, 2(x₁ − 2)), minimum at (1, 2) (by hand).
 */
import { describe, expect, it } from 'vitest';
import { levenbergMarquardt } from '../../src/numerics/levenberg-marquardt.js';
import type { LeastSquaresProblem, NormalLinearisation } from '../../src/numerics/levenberg-marquardt.js';

const residuals = (x: Float64Array) => [x[0] - 1, 2 * (x[1] - 2)];
const cost = (x: Float64Array) => 0.5 * residuals(x).reduce((s, v) => s + v * v, 0);
function exact(x: Float64Array): NormalLinearisation {
  const r = residuals(x);
  return { kind: 'normal', cost: cost(x), A: Float64Array.from([1, 0, 0, 4]), g: Float64Array.from([r[0], 2 * r[1]]) };
}

describe('Levenberg–Marquardt with a system that does not factorise', () => {
  it('an indefinite normal matrix (round-off gone wrong) at the first iterate: μ grows, then the fit converges', () => {
    let calls = 0;
    const problem: LeastSquaresProblem = {
      size: 2,
      cost,
      linearise: (x) => {
        const lin = exact(x);
        // The first linearisation carries a negative eigenvalue far beyond Cholesky's shifts.
        if (calls++ === 0) lin.A[3] = -0.5;
        return lin;
      },
    };
    const r = levenbergMarquardt(problem, Float64Array.from([3, -1]), { damping: 'identity', maxIterations: 50, gradientTolerance: 1e-12 });
    expect(r.x[0]).toBeCloseTo(1, 8);
    expect(r.x[1]).toBeCloseTo(2, 8);
    expect(calls).toBeGreaterThan(1);
  });

  it('a normal matrix with a non-finite entry: the fit stops as stalled at its start, without an exception', () => {
    const problem: LeastSquaresProblem = {
      size: 2,
      cost,
      linearise: (x) => {
        const lin = exact(x);
        lin.A[2] = Number.NaN;
        return lin;
      },
    };
    const x0 = Float64Array.from([3, -1]);
    const r = levenbergMarquardt(problem, x0, { maxIterations: 5 });
    expect(r.reason).toBe('stalled');
    expect(Array.from(r.x)).toEqual([3, -1]);
  });
});

import { describe, expect, it } from 'vitest';
import { boundedLeastSquares } from '../../src/numerics/bounded-least-squares.js';

describe('bounded Levenberg–Marquardt', () => {
  it("finds Rosenbrock's minimum (1, 1) from the classic start (−1.2, 1)", () => {
    // Rosenbrock, Comput. J. 3, 175 (1960): residuals 10(y − x²), 1 − x; minimum at (1, 1).
    const r = boundedLeastSquares((p) => Float64Array.of(10 * (p[1] - p[0] * p[0]), 1 - p[0]), [-1.2, 1], { lower: [-5, -5], upper: [5, 5], steps: [1e-7, 1e-7], maxIterations: 200, relTol: 1e-15, stepTol: 1e-6 });
    expect(r.p[0]).toBeCloseTo(1, 5);
    expect(r.p[1]).toBeCloseTo(1, 5);
  });

  it('recovers the parameters of a noiseless exponential decay', () => {
    // y = a e^{−b t} + c sampled exactly: the least-squares solution is the generating (a, b, c).
    const t = Float64Array.from({ length: 30 }, (_, i) => i * 0.2);
    const y = t.map((v) => 2.5 * Math.exp(-1.3 * v) + 0.4);
    const r = boundedLeastSquares((p) => t.map((v, i) => p[0] * Math.exp(-p[1] * v) + p[2] - y[i]), [1, 0.5, 0], { lower: [0, 0, -1], upper: [10, 10, 1], steps: [1e-7, 1e-7, 1e-7], maxIterations: 100, relTol: 1e-16, stepTol: 1e-6 });
    expect(r.p[0]).toBeCloseTo(2.5, 6);
    expect(r.p[1]).toBeCloseTo(1.3, 6);
    expect(r.p[2]).toBeCloseTo(0.4, 6);
  });

  it('stops on a bound when the unconstrained minimum lies outside the box', () => {
    // min (x − 3)² + (y + 1)² over [0, 2] × [0, 2]: the projection of (3, −1) onto the box, (2, 0).
    const r = boundedLeastSquares((p) => Float64Array.of(p[0] - 3, p[1] + 1), [1, 1], { lower: [0, 0], upper: [2, 2], steps: [1e-6, 1e-6] });
    expect(r.p[0]).toBeCloseTo(2, 10);
    expect(r.p[1]).toBeCloseTo(0, 10);
    expect(r.atBound).toEqual([true, true]);
  });
});

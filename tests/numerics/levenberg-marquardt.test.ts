import { describe, expect, it } from 'vitest';
import { levenbergMarquardt } from '../../src/numerics/levenberg-marquardt.js';
import type { LeastSquaresProblem } from '../../src/numerics/levenberg-marquardt.js';
import { Xorshift128 } from '../../src/numerics/random.js';

/** A problem given by r(x) and J(x) (row-major m·n), linearised as the dense form. */
function denseProblem(n: number, m: number, r: (x: Float64Array) => Float64Array, J: (x: Float64Array) => Float64Array): LeastSquaresProblem {
  const cost = (x: Float64Array) => 0.5 * r(x).reduce((s, v) => s + v * v, 0);
  return { size: n, cost, linearise: (x) => ({ kind: 'dense', cost: cost(x), m, J: J(x), r: r(x) }) };
}

/**
 * Rosenbrock's function as least squares (Moré, Garbow & Hillstrom, ACM Trans. Math. Softw.
 * 7, 17, 1981, problem 1): r = (10 (x₂ − x₁²), 1 − x₁), start (−1.2, 1), minimum 0 at (1, 1).
 */
const rosenbrock = denseProblem(
  2,
  2,
  (x) => new Float64Array([10 * (x[1] - x[0] * x[0]), 1 - x[0]]),
  (x) => new Float64Array([-20 * x[0], 10, -1, 0]),
);

/**
 * NIST StRD nonlinear regression "Misra1a" (lower difficulty; from memory): y = b₁(1 − exp(−b₂ x)),
 * 14 observations, certified b₁ = 2.3894212918e2, b₂ = 5.5015643181e−4, start 1 (500, 1e−4).
 */
const misraX = [77.6, 114.9, 141.1, 190.8, 239.9, 289.0, 332.8, 378.4, 434.8, 477.3, 536.8, 593.1, 689.1, 760.0];
const misraY = [10.07, 14.73, 17.94, 23.93, 29.61, 35.18, 40.02, 44.82, 50.76, 55.05, 61.01, 66.4, 75.47, 81.78];
const misra = denseProblem(
  2,
  14,
  (b) => Float64Array.from(misraX, (x, i) => b[0] * (1 - Math.exp(-b[1] * x)) - misraY[i]),
  (b) => {
    const J = new Float64Array(28);
    misraX.forEach((x, i) => {
      J[2 * i] = 1 - Math.exp(-b[1] * x);
      J[2 * i + 1] = b[0] * x * Math.exp(-b[1] * x);
    });
    return J;
  },
);

describe('levenbergMarquardt', () => {
  it('finds the minimum of Rosenbrock (1, 1) from (−1.2, 1)', () => {
    const r = levenbergMarquardt(rosenbrock, new Float64Array([-1.2, 1]), { maxIterations: 200, costTolerance: 1e-30, gradientTolerance: 1e-14 });
    expect(Math.abs(r.x[0] - 1)).toBeLessThan(1e-8);
    expect(Math.abs(r.x[1] - 1)).toBeLessThan(1e-8);
    expect(r.iterations).toBeLessThan(100);
  });

  it('fits Misra1a to the certified values (NIST StRD) with both dampings', () => {
    for (const damping of ['marquardt', 'identity'] as const) {
      const r = levenbergMarquardt(misra, new Float64Array([500, 1e-4]), { maxIterations: 500, damping, gradientTolerance: 1e-12, stepTolerance: 1e-15 });
      expect(Math.abs(r.x[0] / 238.94212918 - 1)).toBeLessThan(1e-6);
      expect(Math.abs(r.x[1] / 5.5015643181e-4 - 1)).toBeLessThan(1e-6);
    }
  });

  it('the residual-space (dual) step equals the normal-equations step when m < n', () => {
    // r_i(x) = Σ_j a_ij x_j + ½ (Σ_j x_j)² / n − b_i with 3 residuals and 8 parameters.
    const n = 8;
    const m = 3;
    const rng = new Xorshift128(9);
    const a = Float64Array.from({ length: m * n }, () => rng.next() - 0.5);
    const b = [1, -2, 0.5];
    const sum = (x: Float64Array) => x.reduce((s, v) => s + v, 0);
    const p = denseProblem(
      n,
      m,
      (x) => Float64Array.from(b, (bi, i) => a.slice(i * n, (i + 1) * n).reduce((s, v, j) => s + v * x[j], 0) + (0.5 * sum(x) ** 2) / n - bi),
      (x) => Float64Array.from({ length: m * n }, (_, k) => a[k] + sum(x) / n),
    );
    const x0 = new Float64Array(n).fill(0.1);
    const seen: { dual: number[]; normal: number[] } = { dual: [], normal: [] };
    const runs = (['always', 'never'] as const).map((dual) =>
      levenbergMarquardt(p, x0, {
        damping: 'identity',
        dual,
        maxIterations: 6,
        onIteration: (it) => void (dual === 'always' ? seen.dual : seen.normal).push(it.cost),
      }),
    );
    for (let j = 0; j < n; j++) expect(Math.abs(runs[0].x[j] - runs[1].x[j])).toBeLessThan(1e-9);
    expect(seen.dual.length).toBe(seen.normal.length);
    // Underdetermined and consistent: the cost falls towards 0.
    expect(runs[0].cost).toBeLessThan(1e-10);
  });

  it('stops when the callback says so, and reports it', () => {
    const r = levenbergMarquardt(rosenbrock, new Float64Array([-1.2, 1]), { maxIterations: 50, onIteration: (it) => it.iteration < 3 });
    expect(r.reason).toBe('callback');
    expect(r.iterations).toBe(3);
  });
});

/** The problem with J kept from its last linearisation, for Fan's extra steps. */
function withLastJacobian(n: number, m: number, r: (x: Float64Array) => Float64Array, J: (x: Float64Array) => Float64Array): LeastSquaresProblem {
  let last: Float64Array | null = null;
  const base = denseProblem(n, m, r, J);
  return {
    ...base,
    linearise: (x) => {
      last = J(x);
      return base.linearise(x);
    },
    gradientWithLastJacobian: (x) => {
      const rx = r(x);
      const g = new Float64Array(n);
      for (let i = 0; i < m; i++) for (let a = 0; a < n; a++) g[a] += last![i * n + a] * rx[i];
      return g;
    },
  };
}

// Fan's modified LM (extra steps with the same factorisation): the same minimum, certified
// values of NIST StRD Misra1a (from memory, as above) and Rosenbrock's (1, 1).
describe('levenbergMarquardt with extra steps', () => {
  it('reaches the certified Misra1a parameters and Rosenbrock’s minimum in no more iterations', () => {
    const misraR = (b: Float64Array) => Float64Array.from(misraX, (x, i) => b[0] * (1 - Math.exp(-b[1] * x)) - misraY[i]);
    const misraJ = (b: Float64Array) => {
      const Jm = new Float64Array(28);
      misraX.forEach((x, i) => {
        Jm[2 * i] = 1 - Math.exp(-b[1] * x);
        Jm[2 * i + 1] = b[0] * x * Math.exp(-b[1] * x);
      });
      return Jm;
    };
    let taken = 0;
    const plain = levenbergMarquardt(misra, new Float64Array([500, 1e-4]), { maxIterations: 500, gradientTolerance: 1e-9 });
    const extra = levenbergMarquardt(withLastJacobian(2, 14, misraR, misraJ), new Float64Array([500, 1e-4]), { maxIterations: 500, gradientTolerance: 1e-9, extraSteps: 2, onIteration: (it) => void (taken += it.extraSteps ?? 0) });
    expect(taken).toBeGreaterThan(0);
    expect(Math.abs(extra.x[0] / 2.3894212918e2 - 1)).toBeLessThan(1e-7);
    expect(Math.abs(extra.x[1] / 5.5015643181e-4 - 1)).toBeLessThan(1e-7);
    expect(extra.iterations).toBeLessThanOrEqual(plain.iterations);
    const rosR = (x: Float64Array) => new Float64Array([10 * (x[1] - x[0] * x[0]), 1 - x[0]]);
    const rosJ = (x: Float64Array) => new Float64Array([-20 * x[0], 10, -1, 0]);
    const ros = levenbergMarquardt(withLastJacobian(2, 2, rosR, rosJ), new Float64Array([-1.2, 1]), { maxIterations: 200, costTolerance: 1e-24, extraSteps: 1 });
    expect(Math.abs(ros.x[0] - 1)).toBeLessThan(1e-8);
    expect(Math.abs(ros.x[1] - 1)).toBeLessThan(1e-8);
  });
});

import { describe, expect, it } from 'vitest';
import { cubicMinimizer, lbfgs, twoLoopDirection, type LbfgsResult } from '../../src/numerics/lbfgs.js';

/**
 * Extended Rosenbrock function (Rosenbrock, Comput. J. 3, 175, 1960; n-dimensional form
 * as in Moré, Garbow & Hillstrom, ACM Trans. Math. Softw. 7, 17, 1981, problem 21):
 * f = Σ_{i odd} 100 (x_{i+1} − x_i²)² + (1 − x_i)², minimum f = 0 at x = (1, …, 1).
 */
function rosenbrock(x: Float64Array): { f: number; g: Float64Array } {
  let f = 0;
  const g = new Float64Array(x.length);
  for (let i = 0; i < x.length; i += 2) {
    const a = x[i + 1] - x[i] * x[i];
    const b = 1 - x[i];
    f += 100 * a * a + b * b;
    g[i] = -400 * x[i] * a - 2 * b;
    g[i + 1] = 200 * a;
  }
  return { f, g };
}

/** Every accepted step met the strong Wolfe conditions (N&W eq. 3.7), checked from the trajectory. */
function expectStrongWolfe(r: LbfgsResult, c1 = 1e-4, c2 = 0.9): void {
  for (const it of r.trajectory) {
    expect(it.weakStep).toBe(false);
    expect(it.f).toBeLessThanOrEqual(it.fBefore + c1 * it.step * it.slopeBefore);
    expect(Math.abs(it.slopeAfter)).toBeLessThanOrEqual(-c2 * it.slopeBefore);
  }
}

describe('lbfgs', () => {
  it('minimises the 2D Rosenbrock function from the classic start (−1.2, 1)', () => {
    // Start point and minimiser (1, 1): Rosenbrock 1960, also N&W §9 exercises / MGH 1981.
    const r = lbfgs(rosenbrock, [-1.2, 1], { maxIterations: 200, gradientTolerance: 1e-8 });
    expect(r.reason).toBe('gradient');
    expect(r.x[0]).toBeCloseTo(1, 7);
    expect(r.x[1]).toBeCloseTo(1, 7);
    expect(r.f).toBeLessThan(1e-14);
    // Trade fact (common practice, no source): L-BFGS needs a few tens of iterations here, not hundreds.
    expect(r.iterations).toBeLessThan(60);
    expectStrongWolfe(r);
    // f decreases monotonically (sufficient decrease at every step).
    for (let i = 1; i < r.trajectory.length; i++) expect(r.trajectory[i].f).toBeLessThanOrEqual(r.trajectory[i - 1].f);
  });

  it('minimises the 20-dimensional extended Rosenbrock function from (−1.2, 1, −1.2, 1, …)', () => {
    const x0 = Array.from({ length: 20 }, (_, i) => (i % 2 === 0 ? -1.2 : 1));
    const r = lbfgs(rosenbrock, x0, { maxIterations: 500, history: 7, gradientTolerance: 1e-7 });
    expect(r.reason).toBe('gradient');
    for (const v of r.x) expect(Math.abs(v - 1)).toBeLessThan(1e-6);
    expectStrongWolfe(r);
  });

  // A = D + u uᵀ (SPD, condition number ~ 1e3), minimiser x* chosen; f = ½(x − x*)ᵀA(x − x*)
  // (the same minimiser as ½xᵀAx − bᵀx with b = Ax*, written without cancellation so f
  // keeps its digits near the minimum).
  const n = 30;
  const dvec = Array.from({ length: n }, (_, i) => Math.pow(1000, i / (n - 1)));
  const u = Array.from({ length: n }, (_, i) => Math.sin(i + 1));
  const xStar = Array.from({ length: n }, (_, i) => Math.cos(0.3 * i) - 0.2);
  const Ax = (x: ArrayLike<number>) => {
    let ux = 0;
    for (let i = 0; i < n; i++) ux += u[i] * x[i];
    return Float64Array.from({ length: n }, (_, i) => dvec[i] * x[i] + u[i] * ux);
  };
  const quadratic = (x: Float64Array) => {
    const e = x.map((v, i) => v - xStar[i]);
    const ae = Ax(e);
    let f = 0;
    for (let i = 0; i < n; i++) f += 0.5 * e[i] * ae[i];
    return { f, g: ae };
  };

  it('finds the minimiser x* of a strongly convex quadratic', () => {
    // |x − x*| ≤ |g|₂ / λ_min(A), λ_min ≥ 1 here: max|g| ≤ 1e-9 gives |x − x*| ≤ 1e-9·√n.
    const r = lbfgs(quadratic, new Float64Array(n), { maxIterations: 1000, history: 10, gradientTolerance: 1e-9 });
    expect(r.reason).toBe('gradient');
    for (let i = 0; i < n; i++) expect(Math.abs(r.x[i] - xStar[i])).toBeLessThan(1e-8);
    expectStrongWolfe(r);
  });

  it('with m ≥ n and a near-exact line search it terminates on the quadratic in about n steps', () => {
    // Quadratic termination: BFGS with exact line searches minimises a strongly convex
    // quadratic in at most n iterations (Nocedal & Wright ch. 6), and L-BFGS with m ≥ n
    // is BFGS from H0 = γI. c2 = 1e-3 makes the line search nearly exact. A wrong
    // two-loop recursion loses this property (it then needs several times n).
    const r = lbfgs(quadratic, new Float64Array(n), { maxIterations: 1000, history: n, c2: 1e-3, gradientTolerance: 1e-8 });
    expect(r.reason).toBe('gradient');
    expect(r.iterations).toBeLessThanOrEqual(n + 2);
    expectStrongWolfe(r, 1e-4, 1e-3);
  });

  it('reports why it stopped: iterations, start at the minimiser, non-finite start, callback', () => {
    expect(lbfgs(rosenbrock, [-1.2, 1], { maxIterations: 3 }).reason).toBe('maxIterations');
    const at = lbfgs(rosenbrock, [1, 1]);
    expect(at.reason).toBe('gradient');
    expect(at.iterations).toBe(0);
    expect(lbfgs(() => ({ f: NaN, g: [0] }), [0]).reason).toBe('nonFinite');
    let calls = 0;
    const cb = lbfgs(rosenbrock, [-1.2, 1], { onIteration: () => ++calls < 2 });
    expect(cb.reason).toBe('callback');
    expect(cb.iterations).toBe(2);
    expect(lbfgs(rosenbrock, [-1.2, 1], { maxEvaluations: 5 }).reason).toBe('maxEvaluations');
  });

  it('two-loop recursion equals the dense BFGS inverse-Hessian update applied pair by pair', () => {
    // N&W eq. 6.17: H ← (I − ρ s yᵀ) H (I − ρ y sᵀ) + ρ s sᵀ, from H0 = γI (eq. 7.20);
    // Alg. 7.4 must give exactly −H g (N&W §7.2). Pairs with sᵀy > 0, fixed pseudo-random data.
    const n = 6;
    const k = 4;
    let seed = 12345;
    const rnd = () => ((seed = (Math.imul(seed, 1664525) + 1013904223) >>> 0) / 2 ** 32) * 2 - 1;
    const S: Float64Array[] = [];
    const Y: Float64Array[] = [];
    const rho: number[] = [];
    while (S.length < k) {
      const s = Float64Array.from({ length: n }, rnd);
      const y = s.map((v) => 2 * v + 0.5 * rnd());
      let sy = 0;
      for (let j = 0; j < n; j++) sy += s[j] * y[j];
      if (sy <= 0) continue;
      S.push(s);
      Y.push(y);
      rho.push(1 / sy);
    }
    const g = Float64Array.from({ length: n }, rnd);
    let yy = 0;
    let sy = 0;
    for (let j = 0; j < n; j++) {
      yy += Y[k - 1][j] ** 2;
      sy += S[k - 1][j] * Y[k - 1][j];
    }
    let H = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? sy / yy : 0)));
    for (let p = 0; p < k; p++) {
      const [s, y, r] = [S[p], Y[p], rho[p]];
      const V = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? 1 : 0) - r * y[i] * s[j])); // I − ρ y sᵀ
      const HV = H.map((row) => V[0].map((_, j) => row.reduce((acc, h, l) => acc + h * V[l][j], 0)));
      H = HV.map((_, i) => HV[0].map((_, j) => V.reduce((acc, vrow, l) => acc + vrow[i] * HV[l][j], 0) + r * s[i] * s[j])); // Vᵀ H V + ρ s sᵀ
    }
    const d = twoLoopDirection(g, S, Y, rho);
    for (let i = 0; i < n; i++) {
      const expected = -H[i].reduce((acc, h, j) => acc + h * g[j], 0);
      expect(d[i]).toBeCloseTo(expected, 12);
    }
  });

  it('cubic interpolation recovers the exact minimiser of a cubic (N&W eq. 3.59)', () => {
    // φ(a) = (a − 0.3)² (a + 2): φ' = (a − 0.3)(3a + 3.7); local minimiser a = 0.3.
    const phi = (a: number) => (a - 0.3) ** 2 * (a + 2);
    const dphi = (a: number) => (a - 0.3) * (3 * a + 3.7);
    expect(cubicMinimizer(0, phi(0), dphi(0), 1, phi(1), dphi(1))).toBeCloseTo(0.3, 12);
    expect(cubicMinimizer(1, phi(1), dphi(1), 0, phi(0), dphi(0))).toBeCloseTo(0.3, 12);
  });
});

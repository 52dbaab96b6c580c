/**
 * The ends of a profile-likelihood interval (inverse/profile-likelihood.ts intervalEnd) with
 * and without the curvature estimate of the first trial, against ends found here
 * independently: a dense scan of the profile and bisection on the first crossing. The
 * estimate changes only where the search starts, so both must land on the same root.
 * The curvature estimate (quadraticWidth) is checked on a linear model, whose profile is
 * exactly quadratic, against a refit with the parameter held (Press et al., Numerical Recipes,
 * 3rd ed., §15.6: the projected Δχ² of one parameter is δ²/C_kk with C = (JᵀJ)⁻¹).
 */
import { describe, expect, it } from 'vitest';
import { intervalEnd, quadraticWidth } from '../../src/inverse/profile-likelihood.js';
import type { ProfiledPoint } from '../../src/inverse/profile-likelihood.js';

/** The first v beyond best on one side where P − P_min reaches the level: a scan of 20 000 steps, then 60 bisections. */
function bruteEnd(P: (v: number) => number, best: number, level: number, side: 1 | -1, bound: number): { v: number; open: boolean } {
  const p0 = P(best);
  const over = (v: number) => P(v) - p0 >= level;
  const n = 20000;
  let prev = best;
  for (let i = 1; i <= n; i++) {
    const v = best + ((bound - best) * i) / n;
    if (over(v)) {
      let [a, b] = [prev, v];
      for (let k = 0; k < 60; k++) {
        const m = (a + b) / 2;
        if (over(m)) b = m;
        else a = m;
      }
      return { v: (a + b) / 2, open: false };
    }
    prev = v;
  }
  return { v: bound, open: true };
}

function counted(P: (v: number) => number) {
  const known: ProfiledPoint[] = [];
  let calls = 0;
  const fn = (v: number): ProfiledPoint => {
    calls++;
    const p = { chiN: v, value: P(v) };
    known.push(p);
    return p;
  };
  return { fn, known, calls: () => calls };
}

// Profiles of our own: a quadratic (a well-determined parameter), an asymmetric one, and one
// that saturates (a wall affinity whose effect levels off: the rise tends to 6 on the right).
const cases: { name: string; P: (v: number) => number; best: number; range: [number, number]; width: number }[] = [
  { name: 'quadratic around χN 16', P: (v) => ((v - 16) / 0.3) ** 2, best: 16, range: [5, 60], width: 0.3 * Math.sqrt(3.84) },
  { name: 'asymmetric, negative best', P: (v) => ((v + 0.6) / 0.2) ** 2 + ((v + 0.6) / 0.25) ** 3, best: -0.6, range: [-5, 5], width: 0.2 * Math.sqrt(3.84) },
  { name: 'saturating affinity', P: (v) => 6 * (1 - Math.exp(-((v - 1.2) ** 2) / 0.5)) + (v < 1.2 ? ((v - 1.2) / 0.4) ** 2 : 0), best: 1.2, range: [-5, 5], width: 0.35 },
  { name: 'best at zero', P: (v) => (v / 0.05) ** 2, best: 0, range: [-5, 5], width: 0.05 * Math.sqrt(3.84) },
];

describe('interval ends', () => {
  for (const c of cases) {
    it(`${c.name}: the same ends with and without the curvature estimate, both on the brute-force crossing`, () => {
      for (const level of [1, 3.84, 8]) {
        for (const side of [1, -1] as const) {
          const bound = side > 0 ? c.range[1] : c.range[0];
          const brute = bruteEnd(c.P, c.best, level, side, bound);
          const plain = counted(c.P);
          const best = { chiN: c.best, value: c.P(c.best) };
          const a = intervalEnd(plain.fn, best, level, side, c.range, [best]);
          const guided = counted(c.P);
          const b = intervalEnd(guided.fn, best, level, side, c.range, [best], { width: c.width * Math.sqrt(level / 3.84) });
          expect(a.limitedByRange, `${c.name} level ${level} side ${side}`).toBe(brute.open);
          expect(b.limitedByRange).toBe(brute.open);
          // Brent's tolerance is 1e-4 of the distance from the best point.
          const tol = 2e-4 * Math.abs(brute.v - c.best) + 1e-9;
          expect(Math.abs(a.chiN - brute.v), `plain ${a.chiN} vs ${brute.v}`).toBeLessThan(tol);
          expect(Math.abs(b.chiN - brute.v), `guided ${b.chiN} vs ${brute.v}`).toBeLessThan(tol);
          expect(Math.abs(a.chiN - b.chiN)).toBeLessThan(tol);
          // The estimate saves trials (each one a refit of every other parameter in a real fit).
          expect(guided.calls()).toBeLessThanOrEqual(plain.calls());
        }
      }
    });
  }

  it('steps away from a negative best value (a B-preferring wall): the first step is 10⁻³ of |best|, or the curvature estimate', () => {
    const c = cases[1];
    const best = { chiN: c.best, value: c.P(c.best) };
    const plain = counted(c.P);
    intervalEnd(plain.fn, best, 3.84, 1, c.range, [best]);
    const guided = counted(c.P);
    intervalEnd(guided.fn, best, 3.84, 1, c.range, [best], { width: c.width });
    expect(guided.calls()).toBeLessThan(plain.calls());
  });

  it('reaches a bound the level never crosses in one trial when the estimate points beyond it', () => {
    const P = (v: number) => 2 * (1 - Math.exp(-((v - 1) ** 2))); // rises to 2 at most: the 3.84 level is never crossed
    const best = { chiN: 1, value: 0 };
    const g = counted(P);
    const r = intervalEnd(g.fn, best, 3.84, 1, [-5, 5], [best], { width: 10 });
    expect(r).toEqual({ chiN: 5, limitedByRange: true, evaluations: 1 });
  });
});

describe('quadraticWidth', () => {
  it('is the exact distance to the level for a linear model, against a refit with the parameter held', () => {
    // Residuals r_i = a + b·x_i + c·x_i² − y_i at 9 points, weighted; y of our own.
    const x = [-2, -1.5, -1, -0.5, 0, 0.5, 1, 1.5, 2];
    const y = x.map((t, i) => 0.3 - 0.7 * t + 0.2 * t * t + 0.05 * Math.sin(3 * i));
    const w = x.map((_, i) => 1 + 0.1 * i);
    const cols = [x.map((_, i) => w[i]), x.map((t, i) => w[i] * t), x.map((t, i) => w[i] * t * t)];
    // Refit (a, c) by their 2×2 normal equations at b held, and return the sum of squares.
    const cost = (b: number) => {
      const rhs = y.map((v, i) => w[i] * v - b * cols[1][i]);
      const A = [
        [dot(cols[0], cols[0]), dot(cols[0], cols[2])],
        [dot(cols[2], cols[0]), dot(cols[2], cols[2])],
      ];
      const g = [dot(cols[0], rhs), dot(cols[2], rhs)];
      const det = A[0][0] * A[1][1] - A[0][1] * A[1][0];
      const a = (g[0] * A[1][1] - A[0][1] * g[1]) / det;
      const c = (A[0][0] * g[1] - A[1][0] * g[0]) / det;
      return rhs.reduce((s, v, i) => s + (v - a * cols[0][i] - c * cols[2][i]) ** 2, 0);
    };
    // The best b: the minimum of the profiled cost (golden-section search, 200 steps).
    let [lo, hi] = [-5, 5];
    for (let k = 0; k < 200; k++) {
      const m1 = lo + 0.382 * (hi - lo);
      const m2 = lo + 0.618 * (hi - lo);
      if (cost(m1) < cost(m2)) hi = m2;
      else lo = m1;
    }
    const bBest = (lo + hi) / 2;
    const width = quadraticWidth(cols, 1, 3.84)!;
    expect(cost(bBest + width) - cost(bBest)).toBeCloseTo(3.84, 6);
    expect(cost(bBest - width) - cost(bBest)).toBeCloseTo(3.84, 6);
  });

  it('is undefined for a parameter the residuals do not see', () => {
    expect(quadraticWidth([[1, 2, 3], [0, 0, 0]], 1, 1)).toBeUndefined();
  });
});

function dot(a: number[], b: number[]): number {
  return a.reduce((s, v, i) => s + v * b[i], 0);
}

import { describe, expect, it } from 'vitest';
import { bandLimitedFit } from '../../src/numerics/band-limited-fit.js';
import { PeriodicCell } from '../../src/physics/cell/periodic-cell.js';
import { fieldAtPoints } from '../../src/physics/fields.js';

const L = 3.7;
const f = (t: number) => 0.4 + Math.cos((2 * Math.PI * 2 * t) / L) + 0.3 * Math.sin((2 * Math.PI * 5 * t) / L);
const grid = (n: number) => Float64Array.from({ length: n }, (_, j) => f((j * L) / n));
const points = [0.05, 0.77, 1.9, 3.1, 3.69];

describe('periodic interpolation', () => {
  it('the trigonometric interpolation matrix is exact for a band-limited function', () => {
    // Sampling theorem (common practice, no source): modes below n/2 are reproduced exactly.
    const n = 16;
    const m = new PeriodicCell(L, n).interpolationMatrix(points);
    const u = grid(n);
    points.forEach((t, i) => {
      let v = 0;
      for (let j = 0; j < n; j++) v += u[j] * m[j * points.length + i];
      expect(v).toBeCloseTo(f(t), 12);
    });
  });

  it('with a Gaussian blur it multiplies each mode by exp(−k²W²/2)', () => {
    // Convolution theorem: a Gaussian of standard deviation W has Fourier transform exp(−k²W²/2).
    const n = 32;
    const W = 0.2;
    const m = new PeriodicCell(L, n).interpolationMatrix(points, W);
    const u = grid(n);
    const k = (q: number) => (2 * Math.PI * q) / L;
    const blurred = (t: number) => 0.4 + Math.exp(-0.5 * (k(2) * W) ** 2) * Math.cos(k(2) * t) + 0.3 * Math.exp(-0.5 * (k(5) * W) ** 2) * Math.sin(k(5) * t);
    points.forEach((t, i) => {
      let v = 0;
      for (let j = 0; j < n; j++) v += u[j] * m[j * points.length + i];
      expect(v).toBeCloseTo(blurred(t), 12);
    });
  });

  it('a prescribed tabulated field is read at any point by the same interpolant', () => {
    const v = fieldAtPoints({ type: 'values', values: Array.from(grid(16)) }, L, points);
    points.forEach((t, i) => expect(v[i]).toBeCloseTo(f(t), 12));
  });

  it('the band-limited least-squares fit recovers a trigonometric polynomial from scattered samples', () => {
    const t = Array.from({ length: 40 }, (_, i) => (i * 0.37 * L) % L);
    const fit = bandLimitedFit(t, t.map(f), t.map(() => 1), L, 6);
    const v = fit(points);
    points.forEach((x, i) => expect(v[i]).toBeCloseTo(f(x), 10));
  });
});

/**
 * The moment expansion of the offset misfit (src/inverse/offset-misfit-moments.ts) against the
 * direct sum Σ w (u(x − x0) − φ)², with u the trigonometric interpolant of grid values written
 * out here independently (a plain DFT and a sum of cosines and sines: the textbook band-limited
 * interpolant, common practice, no source); and fitOffset's many-point path against a brute
 * scan of that direct sum.
 */
import { describe, expect, it } from 'vitest';
import { FourierSeries } from '../../src/physics/cell/fourier-series.js';
import { OffsetMisfitMoments } from '../../src/inverse/offset-misfit-moments.js';
import { fitOffset, MOMENTS_FROM } from '../../src/inverse/offset-fit.js';
import { Xorshift128 } from '../../src/numerics/random.js';

/** u(x) of grid values u_j at x_j = jL/N (N even), by a direct DFT: c_m = (1/N) Σ u_j e^{−2πimj/N}. */
function interpolant(u: number[], L: number): (x: number) => number {
  const N = u.length;
  const c = Array.from({ length: N / 2 + 1 }, (_, m) => {
    let re = 0;
    let im = 0;
    for (let j = 0; j < N; j++) {
      re += (u[j] * Math.cos((2 * Math.PI * m * j) / N)) / N;
      im -= (u[j] * Math.sin((2 * Math.PI * m * j) / N)) / N;
    }
    return { re, im };
  });
  return (x) => {
    let s = c[0].re;
    for (let m = 1; m < N / 2; m++) {
      const k = (2 * Math.PI * m) / L;
      s += 2 * (c[m].re * Math.cos(k * x) - c[m].im * Math.sin(k * x));
    }
    return s + c[N / 2].re * Math.cos((Math.PI * N * x) / L);
  };
}

/** A lamella-like grid profile (tanh walls), data over three periods with noise and uneven weights. */
function problem(n: number, noise: number) {
  const rng = new Xorshift128(7);
  const L = 3.7;
  const N = 32;
  const grid = Array.from({ length: N }, (_, j) => 0.5 + 0.44 * Math.tanh(4 * Math.cos((2 * Math.PI * j) / N)));
  const model = FourierSeries.fromGrid(grid, L);
  const u = interpolant(grid, L);
  const trueX0 = 1.234;
  const x = Float64Array.from({ length: n }, (_, i) => (3 * L * i) / n + 0.3 * rng.next() * (3 * L) / n);
  const phi = x.map((xi) => u(xi - trueX0) + noise * (rng.next() - 0.5));
  const weight = Float64Array.from({ length: n }, () => 0.5 + rng.next());
  const direct = (x0: number) => {
    let s = 0;
    for (let i = 0; i < n; i++) s += weight[i] * (u(x[i] - x0) - phi[i]) ** 2;
    return s;
  };
  return { L, model, data: { x, phi, weight }, direct, trueX0 };
}

describe('offset misfit by moments', () => {
  it('equals the direct sum at any offset (noisy data, uneven weights)', () => {
    const { model, data, direct } = problem(1500, 0.05);
    const mom = new OffsetMisfitMoments(model, data);
    for (const x0 of [0, 0.37, 1.234, 2.9, 3.69, -1.1, 7.5]) {
      const d = direct(x0);
      expect(Math.abs(mom.value(x0) - d) / d).toBeLessThan(1e-10);
    }
  });

  it('fitOffset with many points finds the offset a brute scan of the direct sum finds, and reports its directly summed value', () => {
    const n = Math.max(MOMENTS_FROM, 2000);
    const { L, model, data, direct, trueX0 } = problem(n, 0.02);
    const r = fitOffset(model, data);
    // Brute scan of the direct sum on a fine grid, then a golden-section polish (independent of Brent).
    let best = 0;
    for (let j = 1; j < 200; j++) if (direct((j * L) / 200) < direct((best * L) / 200)) best = j;
    let a = ((best - 1) * L) / 200;
    let b = ((best + 1) * L) / 200;
    const g = (Math.sqrt(5) - 1) / 2;
    for (let it = 0; it < 60; it++) {
      const c = b - g * (b - a);
      const d = a + g * (b - a);
      if (direct(c) < direct(d)) b = d;
      else a = c;
    }
    const x0 = (((a + b) / 2) % L + L) % L;
    expect(Math.abs(r.x0 - x0)).toBeLessThan(1e-6);
    expect(Math.abs(r.x0 - trueX0)).toBeLessThan(1e-2);
    expect(Math.abs(r.value - direct(r.x0)) / r.value).toBeLessThan(1e-11);
  });

  it('noise-free data: the reported misfit is summed directly (no round-off floor from the expansion)', () => {
    const { model, data } = problem(4000, 0);
    const r = fitOffset(model, data);
    // The data are the model itself: the misfit is round-off of the interpolant, far below the
    // expansion's own floor (≈ 1e-16 · Σ w φ² ≈ 1e-13 here).
    expect(r.value).toBeLessThan(1e-20);
  });
});

import { describe, expect, it } from 'vitest';
import { brentRoot } from '../../src/numerics/brent-root.js';
import { deltaChi2Level, LEVELS, studentT } from '../../src/inverse/confidence.js';
import { FourierSeries } from '../../src/physics/cell/fourier-series.js';
import { PeriodicCell } from '../../src/physics/cell/periodic-cell.js';
import { conventionShift } from '../../src/physics/phase-convention.js';
import { GaussianNoise, Xorshift128 } from '../../src/numerics/random.js';
import { fitOffset } from '../../src/inverse/offset-fit.js';
import { LamellaModel } from '../../src/inverse/lamella-model.js';
import { findEquilibriumPeriod } from '../../src/spectral/period-search.js';

const smooth = (x: number, L: number) => Math.exp(Math.cos((2 * Math.PI * x) / L)) + 0.3 * Math.sin((4 * Math.PI * x) / L);

describe('band-limited interpolation of a periodic grid function', () => {
  it('reproduces the grid values and is spectrally accurate between them', () => {
    const L = 3.7;
    const n = 32;
    const u = Float64Array.from({ length: n }, (_, j) => smooth((j * L) / n, L));
    const p = FourierSeries.fromGrid(u, L);
    const grid = p.evaluateShifted(Float64Array.from({ length: n }, (_, j) => (j * L) / n), 0, new Float64Array(n));
    for (let j = 0; j < n; j++) expect(Math.abs(grid[j] - u[j])).toBeLessThan(1e-13);
    // Common practice, no source: the Fourier coefficients of an analytic periodic function decay
    // exponentially, so 32 points give round-off-level accuracy off the grid (linear interpolation: ~1e-2).
    const xs = Float64Array.from({ length: 101 }, (_, i) => -2 + (i * 9.3) / 100);
    const v = p.evaluateShifted(xs, 0.37, new Float64Array(xs.length));
    for (let i = 0; i < xs.length; i++) expect(Math.abs(v[i] - smooth(xs[i] - 0.37, L))).toBeLessThan(1e-11);
  });

  it('Gaussian blur multiplies cos(kx) by exp(−k²W²/2)', () => {
    // Analytic: the convolution of cos(kx) with a normalised Gaussian of standard deviation W.
    const L = 4;
    const n = 16;
    const k = (2 * Math.PI * 2) / L;
    const u = Float64Array.from({ length: n }, (_, j) => 0.5 + 0.2 * Math.cos((k * j * L) / n));
    const b = FourierSeries.fromGrid(u, L).blurred(0.3);
    const x = Float64Array.of(0, 0.4, 1.3);
    const v = b.evaluateShifted(x, 0, new Float64Array(3));
    for (let i = 0; i < 3; i++) expect(v[i]).toBeCloseTo(0.5 + 0.2 * Math.exp(-0.5 * k * k * 0.09) * Math.cos(k * x[i]), 13);
  });

  it('the phase convention moves the peak of the fundamental to x = 0; spectral resampling is exact for band-limited data', () => {
    const L = 3;
    const n = 32;
    const u = Float64Array.from({ length: n }, (_, j) => 0.5 + 0.3 * Math.cos((2 * Math.PI * ((j * L) / n - 0.8)) / L));
    const cell = new PeriodicCell(L, n, 1);
    const shift = conventionShift(cell, u);
    expect(shift).toBeCloseTo(0.8, 12);
    expect(cell.translation.shift(u, shift)[0]).toBeCloseTo(0.8, 12);
    const up = cell.resample(u, 64);
    for (let j = 0; j < 64; j++) expect(up[j]).toBeCloseTo(0.5 + 0.3 * Math.cos((2 * Math.PI * ((j * L) / 64 - 0.8)) / L), 12);
    const down = cell.withPoints(64).resample(up, 32);
    for (let j = 0; j < 32; j++) expect(down[j]).toBeCloseTo(u[j], 12);
  });

  it('finds the global phase offset of a model curve by scan and Brent', () => {
    const L = 3.2;
    const n = 64;
    const u = Float64Array.from({ length: n }, (_, j) => smooth((j * L) / n, L));
    const p = FourierSeries.fromGrid(u, L);
    const x = Float64Array.from({ length: 50 }, (_, i) => 0.1 + i * 0.13);
    const phi = p.evaluateShifted(x, 2.345, new Float64Array(50));
    const r = fitOffset(p, { x, phi, weight: new Float64Array(50).fill(1) });
    expect(r.x0).toBeCloseTo(2.345, 8);
    expect(r.value).toBeLessThan(1e-18);
  });
});

describe('seeded noise', () => {
  it('repeats exactly for a seed and differs between seeds; Box–Muller gives unit variance', () => {
    const a = new GaussianNoise(7);
    const b = new GaussianNoise(7);
    const c = new GaussianNoise(8);
    const xs = Array.from({ length: 20000 }, () => a.next());
    const ys = Array.from({ length: 20000 }, () => b.next());
    expect(xs).toEqual(ys);
    expect(new GaussianNoise(8).next()).toBe(c.next());
    expect(xs[0]).not.toBe(new GaussianNoise(8).next());
    const mean = xs.reduce((s, v) => s + v, 0) / xs.length;
    const variance = xs.reduce((s, v) => s + (v - mean) ** 2, 0) / xs.length;
    // Sampling error of the mean and variance of 20000 standard normals: 0.007 and 0.01 (one sigma).
    expect(Math.abs(mean)).toBeLessThan(0.03);
    expect(Math.abs(variance - 1)).toBeLessThan(0.04);
    const u = new Xorshift128(0);
    for (let i = 0; i < 1000; i++) {
      const v = u.next();
      expect(v).toBeGreaterThanOrEqual(0);
      expect(v).toBeLessThan(1);
    }
  });
});

describe('root finding and interval levels', () => {
  it('Brent root finding converges on a smooth function', () => {
    const f = (x: number) => Math.cos(x) - x;
    const r = brentRoot(f, 0, 1, f(0), f(1), 1e-12);
    // Known constant: the Dottie number, the fixed point of cos, 0.7390851332151607.
    expect(r.x).toBeCloseTo(0.7390851332151607, 11);
    expect(r.evaluations).toBeLessThan(12);
  });

  it('Δχ² levels: 1 and 3.841 with sigma known; t² quantiles with sigma estimated', () => {
    expect(deltaChi2Level(LEVELS[0], false, 10)).toBe(1);
    // χ²(1) 95 % quantile, any statistics table: 3.841.
    expect(deltaChi2Level(LEVELS[1], false, 10)).toBeCloseTo(3.8415, 4);
    // Student t table (e.g. Abramowitz & Stegun table 26.10): t_{0.975} = 12.706 (ν = 1), 4.303 (2), 2.5706 (5), 2.2281 (10), 2.000 (60).
    expect(studentT(0.975, LEVELS[1].z, 1)).toBeCloseTo(12.706, 3);
    expect(studentT(0.975, LEVELS[1].z, 2)).toBeCloseTo(4.303, 3);
    expect(studentT(0.975, LEVELS[1].z, 5)).toBeCloseTo(2.5706, 3);
    expect(studentT(0.975, LEVELS[1].z, 10)).toBeCloseTo(2.2281, 3);
    expect(studentT(0.975, LEVELS[1].z, 60)).toBeCloseTo(2.0003, 3);
    expect(deltaChi2Level(LEVELS[0], true, 62)).toBeGreaterThan(1);
  });
});

describe('stress-free period of the forward model', () => {
  it('agrees with the free-energy minimisation of the reference (period-search.ts)', () => {
    const chain = { type: 'diblock' as const, f: 0.5, segmentRatio: 1 };
    const m = new LamellaModel({ chain, nx: 32, ns: 60 });
    const eq = m.equilibrium(15);
    const ref = findEquilibriumPeriod({ system: { chain, chiN: 15 }, cell: new PeriodicCell(1, 32, 1), contour: 60, options: { periodTolerance: 1e-7 } });
    // F(L) is flat at its minimum, so the minimisation fixes L only to ~1e-6 at a field tolerance of 1e-9.
    expect(Math.abs(eq.period / ref.period - 1)).toBeLessThan(1e-5);
    expect(Math.abs(eq.solution.freeEnergy - ref.solution.freeEnergy)).toBeLessThan(1e-10);
    // Warm-started neighbours: far fewer iterations than a cold solve, and still stress-free.
    const before = m.counters.iterations;
    const next = m.equilibrium(15.2);
    expect(m.counters.iterations - before).toBeLessThan(120);
    expect(next.period).toBeGreaterThan(eq.period);
  });
});

describe('the periodogram start of the free period', () => {
  it('finds the period of a noisy sinusoid sampled at irregular points, to the scan spacing', async () => {
    const { periodogramPeriod } = await import('../../src/inverse/objective.js');
    const L0 = 4.1;
    const rng = new Xorshift128(7);
    const noise = new GaussianNoise(8);
    const n = 60;
    // Irregular sampling over about three periods: a + b cos(kx) + c sin(kx) is then the exact model, so the best L is L0 up to noise.
    const x = Float64Array.from({ length: n }, (_, i) => (12 * (i + 0.5 * rng.next())) / n).sort();
    const phi = Float64Array.from(x, (xi) => 0.5 + 0.3 * Math.cos((2 * Math.PI * (xi - 0.7)) / L0) + 0.01 * noise.next());
    const weight = new Float64Array(n).fill(1);
    const lo = 2;
    const hi = 8;
    const points = 400;
    const L = periodogramPeriod({ x, phi, weight }, lo, hi, points);
    // One step of the geometric scan is a factor (hi/lo)^(1/(points−1)).
    const step = Math.pow(hi / lo, 1 / (points - 1)) - 1;
    expect(Math.abs(L / L0 - 1)).toBeLessThan(1.5 * step);
  });
});

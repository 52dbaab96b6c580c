import { describe, expect, it } from 'vitest';
import { createModels } from '../../src/inverse/classical.js';
import { diblock, invert, phaseDistance, synthData } from './helpers.js';

describe('classical estimator on synthetic profiles', () => {
  it('noiseless f = 0.5, χN = 15, 64 points: χN to 1e-4 relative (default grid 64 × 100)', () => {
    const chain = diblock(0.5);
    const { data, truth } = synthData({ chain, chiN: 15, offset: 0.9, nx: 64, ns: 100 });
    const e = invert(data, { chain, nx: 64, ns: 100, profilePoints: 5 });
    expect(Math.abs(e.chiN / 15 - 1)).toBeLessThan(1e-4);
    expect(Math.abs(e.period / truth.period - 1)).toBeLessThan(1e-5);
    expect(phaseDistance(e.offset, 0.9, e.period)).toBeLessThan(1e-4);
    expect(e.interval[0]).toBeLessThanOrEqual(e.chiN);
    expect(e.interval[1]).toBeGreaterThanOrEqual(e.chiN);
    // No sigma column and residuals at round-off: sigma is floored and says so.
    expect(e.sigma.source).toBe('estimated');
    expect(e.notes.join(' ')).toMatch(/numerical precision/);
    // The drawn curve spans the 95 % interval, with Δχ² = 0 at the minimum.
    expect(e.profile.length).toBeGreaterThan(5);
    expect(Math.min(...e.profile.map((p) => p.deltaChi2))).toBeLessThan(1e-6);
  });

  it('unknown phase offset and a profile over two periods', () => {
    const chain = diblock(0.5);
    const { data, truth } = synthData({ chain, chiN: 15, periods: 2, offset: 2.9, points: 96 });
    const e = invert(data, { chain });
    expect(Math.abs(e.chiN / 15 - 1)).toBeLessThan(1e-4);
    expect(phaseDistance(e.offset, 2.9, truth.period)).toBeLessThan(1e-4);
  });

  it('asymmetric diblock f = 0.3: noiseless to 1e-4, 2 % noise inside its 95 % interval', () => {
    const chain = diblock(0.3);
    const models = createModels({ chain, nx: 32, ns: 60 });
    const clean = synthData({ chain, chiN: 20, offset: 1.1, periods: 1.5, points: 80 }, models);
    const e = invert(clean.data, { chain }, models);
    expect(Math.abs(e.chiN / 20 - 1)).toBeLessThan(1e-4);
    expect(phaseDistance(e.offset, 1.1, clean.truth.period)).toBeLessThan(1e-4);
    const noisy = synthData({ chain, chiN: 20, offset: 1.1, periods: 1.5, points: 80, noise: 0.02, seed: 5 }, models);
    const n = invert(noisy.data, { chain }, models);
    expect(Math.abs(n.chiN / 20 - 1)).toBeLessThan(0.02);
    expect(n.interval95[0]).toBeLessThan(20);
    expect(n.interval95[1]).toBeGreaterThan(20);
  });

  it('instrument resolution: blurred synthetic data are recovered with the same resolution, and biased without it', () => {
    const chain = diblock(0.5);
    const models = createModels({ chain, nx: 32, ns: 60 });
    const { data } = synthData({ chain, chiN: 18, resolution: 0.25, offset: 0.4 }, models);
    const e = invert(data, { chain, resolution: 0.25 }, models);
    expect(Math.abs(e.chiN / 18 - 1)).toBeLessThan(1e-4);
    expect(e.fitUnblurred.some((v, i) => Math.abs(v - e.fit[i]) > 1e-3)).toBe(true);
    const ignored = invert(data, { chain, resolution: 0 }, models);
    expect(Math.abs(ignored.chiN / 18 - 1)).toBeGreaterThan(0.03);
  });

  it('free period (1.5 periods) and a given period', () => {
    const chain = diblock(0.5);
    // Data and fit on one model of 16 × 40 (not 32 × 60; half the CPU): the check is that the
    // estimator recovers its own model's χN and period. Measured: χN within 3e-8 relative (free
    // and given), the free period within 2.8e-7 (on 32 × 60: χN 3.6e-8, period 2.2e-9).
    const grid = { nx: 16, ns: 40 };
    const models = createModels({ chain, ...grid });
    const free = synthData({ chain, chiN: 15, periods: 1.5, offset: 0.4, points: 72, ...grid }, models);
    const f = invert(free.data, { chain, period: { mode: 'free' }, ...grid }, models);
    expect(Math.abs(f.chiN / 15 - 1)).toBeLessThan(1e-4);
    expect(Math.abs(f.period / free.truth.period - 1)).toBeLessThan(1e-5);
    expect(f.p).toBe(3);
    const given = synthData({ chain, chiN: 15, period: 4.2, offset: 1.0, ...grid }, models);
    const g = invert(given.data, { chain, period: { mode: 'given', value: 4.2 }, ...grid }, models);
    expect(Math.abs(g.chiN / 15 - 1)).toBeLessThan(1e-4);
    expect(g.period).toBe(4.2);
  });

  it('sigma estimated from the residuals: close to the true noise, with a similar interval', () => {
    const chain = diblock(0.5);
    const models = createModels({ chain, nx: 32, ns: 60 });
    const withSigma = synthData({ chain, chiN: 15, noise: 0.02, seed: 11, offset: 0.5 }, models);
    const without = synthData({ chain, chiN: 15, noise: 0.02, seed: 11, offset: 0.5 }, models, false);
    const a = invert(withSigma.data, { chain }, models);
    const b = invert(without.data, { chain }, models);
    expect(b.sigma.source).toBe('estimated');
    // 62 degrees of freedom: the sample standard deviation is within ±9 % of σ at one sigma.
    expect(Math.abs(b.sigma.value! / 0.02 - 1)).toBeLessThan(0.3);
    expect(b.chiN).toBeCloseTo(a.chiN, 6);
    const wa = a.interval[1] - a.interval[0];
    const wb = b.interval[1] - b.interval[0];
    expect(Math.abs(wb / wa - b.sigma.value! / 0.02)).toBeLessThan(0.05);
    expect(b.intervals['68.3%'].deltaChi2).toBeGreaterThan(1);
    expect(b.reducedChi2).toBeCloseTo(1, 9);
  });
});

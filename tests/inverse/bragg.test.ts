import { describe, expect, it } from 'vitest';
import { braggPeaks } from '../../src/inverse/bragg/bragg-pattern.js';
import { fitBragg } from '../../src/inverse/bragg/bragg-fit.js';
import { LamellaModel } from '../../src/inverse/lamella-model.js';
import { diblock } from './helpers.js';

describe('Bragg peaks of the mean-field lamella', () => {
  it('even orders vanish at f = 0.5 (the profile is antisymmetric about its interfaces)', () => {
    const m = new LamellaModel({ chain: diblock(0.5), nx: 64, ns: 100 });
    const p = braggPeaks(m.equilibrium(20).profile, 1, 6, false);
    expect(p.peaks[1].relative).toBeLessThan(1e-12);
    expect(p.peaks[3].relative).toBeLessThan(1e-12);
    expect(p.peaks[2].relative).toBeGreaterThan(1e-3);
    // q_n = 2πn/D.
    expect(p.peaks[2].q).toBeCloseTo((6 * Math.PI) / p.period, 12);
  });

  it('approach the sharp-interface form sin²(nπf)/n² damped by the Helfand–Tagami interface as χN grows', () => {
    // Helfand & Tagami (1972): interface width w = 2b/sqrt(6χ) (defined by the maximum slope,
    // w = Δφ / |dφ/dx|max, profile ½[1 + tanh(2x/w)]); with b = Rg sqrt(6/N), w = 2 Rg/sqrt(χN).
    // The derivative of that profile is a normalised sech² of variance σ² = π² w²/48; its
    // Gaussian approximation damps I_n by exp(−q_n² σ²).
    const f = 0.3;
    const m = new LamellaModel({ chain: diblock(f), nx: 64, ns: 100 });
    const ratio = (chiN: number) => {
      const p = braggPeaks(m.equilibrium(chiN).profile, 1, 2, false);
      const s2 = (Math.PI * 2) ** 2 / (48 * chiN);
      const form = (n: number) => (Math.sin(n * Math.PI * f) ** 2 / (n * n)) * Math.exp(-(p.peaks[n - 1].q ** 2) * s2);
      return p.peaks[1].relative / (form(2) / form(1));
    };
    const r20 = ratio(20);
    const r40 = ratio(40);
    expect(Math.abs(r40 - 1)).toBeLessThan(Math.abs(r20 - 1));
    expect(Math.abs(r40 - 1)).toBeLessThan(0.2);
  });
});

describe('fit-bragg: χN and D from measured peaks', () => {
  it('recovers χN and D from peaks computed on a finer reference', () => {
    // Scenario of our own: f = 0.3, χN = 18, Rg = 6 nm; "measured" peaks from a 64 × 100 solve, fitted on 32 × 60.
    const fine = new LamellaModel({ chain: diblock(0.3), nx: 64, ns: 100 });
    const pt = fine.equilibrium(18);
    const p = braggPeaks(pt.profile, 1, 4, false);
    const D = pt.period * 6;
    const orders = [1, 2, 3, 4];
    const data = {
      source: 'peaks.csv',
      order: orders,
      q: orders.map((o) => (2 * Math.PI * o) / D),
      intensity: orders.map((o) => 1000 * p.peaks[o - 1].relative),
      dI: orders.map((o) => 30 * Math.max(p.peaks[o - 1].relative, 0.01)),
    };
    const fit = fitBragg(data, { chain: diblock(0.3), nx: 32, ns: 60, lorentz: false, chiNRange: [15, 22] });
    expect(fit.periodNm).toBeCloseTo(D, 8);
    expect(fit.intervals['95%'].lo).toBeLessThan(18);
    expect(fit.intervals['95%'].hi).toBeGreaterThan(18);
    expect(Math.abs(fit.chiN - 18)).toBeLessThan(0.1);
    expect(fit.impliedRgNm).toBeCloseTo(6, 2);
  });
});

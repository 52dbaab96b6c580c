import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/io/errors.js';
import { fiellerInterval } from '../../src/numerics/fieller.js';
import { buildChain } from '../../src/physics/chain.js';
import { structureFactorPerChain } from '../../src/physics/rpa.js';
import type { ScatteringData } from '../../src/inverse/scattering/scattering-csv.js';
import { debyeSOverN, syntheticScattering as synthetic } from '../helpers/debye-scattering.js';
import { parseScatteringCsv } from '../../src/inverse/scattering/scattering-csv.js';
import { fitScattering } from '../../src/inverse/scattering/scattering-fit.js';
import { fitScatteringSeries } from '../../src/inverse/scattering/scattering-series.js';

const diblock = (f: number) => ({ type: 'diblock' as const, f, segmentRatio: 1 });

describe('RPA structure factor of the disordered melt', () => {
  it('peaks at q*Rg ≈ 1.946 for f = 0.5 at every χN (Leibler 1980: x* = 3.785)', () => {
    const chain = buildChain(diblock(0.5));
    for (const chiN of [0, 4, 9, 10.4]) {
      // Golden-section search of the maximum of S over qRg in [1, 3].
      let a = 1;
      let b = 3;
      const h = (t: number) => -structureFactorPerChain(chain, chiN, t * t);
      for (let i = 0; i < 200; i++) {
        const c = b - 0.618 * (b - a);
        const d = a + 0.618 * (b - a);
        if (h(c) < h(d)) b = d;
        else a = c;
      }
      expect((a + b) / 2).toBeCloseTo(1.946, 3);
    }
  });

  it('equals the independent Debye-function expression', () => {
    const chain = buildChain(diblock(0.3));
    for (const x of [0.3, 2, 7.5, 30]) expect(structureFactorPerChain(chain, 12, x)).toBeCloseTo(debyeSOverN(0.3, 12, x), 12);
  });
});

describe('fit-scattering: χN, Rg, K, bg from I(q) (synthetic data from the Debye computation above)', () => {
  it('recovers noiseless parameters', () => {
    const data = synthetic({ f: 0.5, chiN: 8, rg: 6, K: 100, bg: 0.5, noise: 0, seed: 1 });
    const fit = fitScattering(data, { chain: diblock(0.5), rg: { mode: 'free' }, resolution: 0, profilePoints: 0 });
    expect(fit.chiN).toBeCloseTo(8, 5);
    expect(fit.rgNm).toBeCloseTo(6, 6);
    expect(fit.K).toBeCloseTo(100, 3);
    expect(fit.background).toBeCloseTo(0.5, 5);
    expect(fit.chiNSpinodal).toBeCloseTo(10.495, 3);
  });

  it('2 % noise: the truth lies within the 95 % interval, with Rg free, fixed and constrained; an Rg sd widens the interval', () => {
    const truth = { f: 0.4, chiN: 9, rg: 5, K: 40, bg: 1, noise: 0.02, seed: 7 };
    const data = synthetic(truth);
    const chain = diblock(0.4);
    const free = fitScattering(data, { chain, rg: { mode: 'free' }, resolution: 0, profilePoints: 0 });
    const fixed = fitScattering(data, { chain, rg: { mode: 'fixed', value: 5 }, resolution: 0, profilePoints: 0 });
    const cons = fitScattering(data, { chain, rg: { mode: 'constrained', value: 5, sd: 0.25 }, resolution: 0, profilePoints: 0 });
    for (const fit of [free, fixed, cons]) {
      expect(fit.interval95[0]).toBeLessThan(truth.chiN);
      expect(fit.interval95[1]).toBeGreaterThan(truth.chiN);
      expect(fit.warnings).toEqual([]);
    }
    const width = (f: typeof free) => f.interval[1] - f.interval[0];
    expect(width(cons)).toBeGreaterThanOrEqual(width(fixed) * 0.999);
    expect(width(free)).toBeGreaterThanOrEqual(width(cons) * 0.999);
  });

  it('with a Gaussian q resolution in the data, fitting with that resolution recovers χN', () => {
    const data = synthetic({ f: 0.5, chiN: 9.5, rg: 7, K: 10, bg: 0.2, noise: 0, seed: 1, resolution: 0.02 });
    const fit = fitScattering(data, { chain: diblock(0.5), rg: { mode: 'free' }, resolution: 0.02, profilePoints: 0 });
    expect(fit.chiN).toBeCloseTo(9.5, 3);
    expect(fit.rgNm).toBeCloseTo(7, 3);
    // Ignoring it biases χN low (the smeared peak looks broader).
    const naive = fitScattering(data, { chain: diblock(0.5), rg: { mode: 'free' }, resolution: 0, profilePoints: 0 });
    expect(naive.chiN).toBeLessThan(fit.chiN - 0.05);
  });

  it('refuses an ordered sample: a Bragg peak narrower than any RPA peak', () => {
    const q = Float64Array.from({ length: 80 }, (_, i) => 0.04 + (0.96 * i) / 79);
    const I = q.map((v) => 0.3 + 500 * Math.exp(-0.5 * ((v - 0.3) / 0.004) ** 2) + 20 * Math.exp(-0.5 * ((v - 0.9) / 0.004) ** 2));
    const data: ScatteringData = { source: 'ordered.csv', q, qRaw: q, qUnit: 'per_nm', toPerNm: 1, intensity: I, sigma: I.map((v) => 0.02 * v), lines: [] };
    expect(() => fitScattering(data, { chain: diblock(0.5), rg: { mode: 'free' }, resolution: 0, profilePoints: 0 })).toThrow(/spinodal/);
  });

  it('refuses data without the peak when Rg is free', () => {
    const data = synthetic({ f: 0.5, chiN: 8, rg: 6, K: 100, bg: 0.5, noise: 0, seed: 1, qMax: 0.2 });
    expect(() => fitScattering(data, { chain: diblock(0.5), rg: { mode: 'free' }, resolution: 0 })).toThrow(InputError);
  });
});

describe('temperature series: χN(T) = a/T + b', () => {
  // Scenario of our own: a = 4000 K, b = −3, five temperatures, 2 % noise on I.
  const a = 4000;
  const b = -3;
  const temps = [400, 420, 440, 460, 480];
  const files = temps.map((T, i) => ({ data: { ...synthetic({ f: 0.5, chiN: a / T + b, rg: 6, K: 50, bg: 0.3, noise: 0.02, seed: 11 + i }), source: `T${T}.csv` }, temperature: T }));

  it('recovers a, b and the mean-field transition temperature within their 95 % intervals', () => {
    const r = fitScatteringSeries(files, { chain: diblock(0.5), rg: { mode: 'free' }, resolution: 0, profilePoints: 0, segments: 200, nbar: 1000 });
    const s = r.series!;
    expect(s.intervals.a['95%'][0]).toBeLessThan(a);
    expect(s.intervals.a['95%'][1]).toBeGreaterThan(a);
    expect(s.intervals.b['95%'][0]).toBeLessThan(b);
    expect(s.intervals.b['95%'][1]).toBeGreaterThan(b);
    expect(s.chi!.A).toBeCloseTo(s.a / 200, 12);
    const tTrue = a / (10.495 - b);
    const ci = s.meanField.intervals['95%'];
    expect(ci.kind).toBe('interval');
    if (ci.kind === 'interval') {
      expect(ci.lo).toBeLessThan(tTrue);
      expect(ci.hi).toBeGreaterThan(tTrue);
    }
    // Fredrickson–Helfand at N̄ = 1000: (χN)_ODT = 10.495 + 41.022/10 = 14.597, a lower temperature.
    expect(s.fluctuationCorrected!.chiN).toBeCloseTo(14.5972, 4);
    expect(s.fluctuationCorrected!.temperature).toBeLessThan(s.meanField.temperature);
    expect(s.notes.join(' ')).toMatch(/effective χ/);
  });

  it('a series crossing the spinodal is refused at the offending temperature', () => {
    const q = files[0].data.q;
    const I = q.map((v) => 0.3 + 500 * Math.exp(-0.5 * ((v - 0.32) / 0.004) ** 2));
    const ordered = { data: { ...files[0].data, source: 'T380.csv', intensity: I, sigma: I.map((v) => 0.02 * v) }, temperature: 380 };
    expect(() => fitScatteringSeries([...files, ordered], { chain: diblock(0.5), rg: { mode: 'free' }, resolution: 0, profilePoints: 0 })).toThrow(/T = 380 K: T380\.csv: .*spinodal/);
  });
});

describe("Fieller's interval for a ratio", () => {
  it('matches the delta method when the denominator is precise, and is unbounded when it is not', () => {
    // Delta method (first-order error propagation) for θ = a1/a2 with independent errors.
    const r = fiellerInterval(10, 5, 0.01, 1e-6, 0, 1);
    expect(r.kind).toBe('interval');
    if (r.kind === 'interval') {
      const sd = Math.sqrt(0.01 / 25 + (100 / 625) * 1e-6);
      expect((r.hi - r.lo) / 2).toBeCloseTo(sd, 4);
    }
    expect(fiellerInterval(10, 0.1, 0.01, 1, 0, 1).kind).toBe('unbounded');
  });
});

describe('scattering CSV', () => {
  it('reads q in Å⁻¹ as nm⁻¹ × 10 and names the unit trap', () => {
    const d = parseScatteringCsv('q_per_A,I,dI\n0.01,5,0.1\n0.02,6,0.1\n', 'a.csv');
    expect(Array.from(d.q)).toEqual([0.1, 0.2]);
    expect(() => parseScatteringCsv('q,I\n0.1,5\n', 'b.csv')).toThrow(/b\.csv: line 1, column 1 \("q"\): unknown column; name the unit/);
    expect(() => parseScatteringCsv('q_per_nm,I\n0.2,5\n0.1,4\n', 'c.csv')).toThrow(/c\.csv: line 3.*increase strictly/);
  });
});

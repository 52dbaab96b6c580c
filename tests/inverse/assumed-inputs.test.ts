import { describe, expect, it } from 'vitest';
import { assessAssumedInputs, refitter } from '../../src/inverse/assumed-inputs.js';
import { createModels, estimateClassical } from '../../src/inverse/classical.js';
import type { ClassicalSettings } from '../../src/inverse/classical.js';
import { checkLengthScale } from '../../src/inverse/length-scale-check.js';
import { exactRgProfile } from '../../src/inverse/rg-profile.js';
import { fitOffset } from '../../src/inverse/offset-fit.js';
import type { ProfileData } from '../../src/inverse/profile-csv.js';
import { parseProfileCsv } from '../../src/inverse/profile-csv.js';
import { InputError } from '../../src/io/errors.js';
import { diblock, profileEnds, synthData } from './helpers.js';

// A profile in nm: Rg = 6 nm, χN = 15, 2 % noise, two periods (scenario of our own).
const RG = 6;
const chain = diblock(0.5);
const { data: rgData } = synthData({ chain, chiN: 15, noise: 0.02, seed: 3, periods: 2, points: 80, offset: 0.4 });
const nmData: ProfileData = { ...rgData, xRaw: rgData.x.map((v) => v * RG), units: { x: 'nm', rgNm: RG, rgFrom: '--rg-nm' } };
const settings: ClassicalSettings = { chain, nx: 32, ns: 60, period: { mode: 'equilibrium' }, resolution: 0, profilePoints: 0 };

describe('assumed inputs: Rg with an uncertainty', () => {
  const models = createModels(settings);
  const base = estimateClassical(nmData, settings, models);
  const sd = 0.12; // 2 % of Rg
  const report = assessAssumedInputs(base, [{ key: 'rgNm', source: '--rg-nm-sd', value: RG, sd }], refitter(nmData, settings, models), {});

  it('the quadratic approximation and the exact profile (rg-profile.ts) agree with the profile likelihood over Rg computed independently here', () => {
    expect(report.interval![1] - report.interval![0]).toBeGreaterThan(base.interval[1] - base.interval[0]);
    // Exact profile (independent of assumed-inputs.ts): at each χN the equilibrium lamella is
    // fixed and Rg only rescales x, so P(χN) = min over Rg of χ²(χN, Rg) + ((Rg − 6)/sd)²,
    // minimised here by golden section over Rg; the 68.3 % ends where P − P_min = 1.
    const full = models.full;
    const P = (chiN: number) => {
      const prof = full.equilibrium(chiN).profile;
      const chi2 = (rg: number) => {
        const x = nmData.xRaw.map((v) => v / rg);
        return fitOffset(prof, { x, phi: nmData.phi, weight: nmData.sigma!.map((s) => 1 / (s * s)) }).value + ((rg - RG) / sd) ** 2;
      };
      let a = RG - 5 * sd;
      let b = RG + 5 * sd;
      for (let i = 0; i < 40; i++) {
        const c = b - 0.618 * (b - a);
        const d = a + 0.618 * (b - a);
        if (chi2(c) < chi2(d)) b = d;
        else a = c;
      }
      return chi2((a + b) / 2);
    };
    const c0 = report.chiN!;
    const halfQuad = (report.interval![1] - report.interval![0]) / 2;
    // A grid over ± 1.8 half-widths of the interval under test; the ends by linear interpolation.
    const step = halfQuad / 5;
    const grid = Array.from({ length: 19 }, (_, i) => c0 + (i - 9) * step);
    const vals = grid.map(P);
    const exact = profileEnds(grid, vals);
    const halfExact = (exact[1] - exact[0]) / 2;
    // The centre of the exact profile against the one the approximation moved to.
    expect(Math.abs((exact[0] + exact[1]) / 2 - c0)).toBeLessThan(0.15 * halfExact);
    // The quadratic approximation against the exact profile: within 10 % (interpolation error included).
    expect(Math.abs(halfQuad / halfExact - 1)).toBeLessThan(0.1);
    expect(halfExact).toBeGreaterThan(1.3 * (base.interval[1] - base.interval[0]) / 2);
    // The library's exact profile (rg-profile.ts) against this one: ends within a fifth of a grid step.
    const lib = exactRgProfile(nmData, settings, models, base, RG, sd).intervals['68.3%'];
    expect(Math.abs(lib.lo - exact[0])).toBeLessThan(0.2 * step);
    expect(Math.abs(lib.hi - exact[1])).toBeLessThan(0.2 * step);
  });

  it('reports the response at ± sd and the added sd', () => {
    const e = report.effects[0];
    expect(e.chiNAtMinus).toBeGreaterThan(base.chiN); // a smaller Rg makes the period longer in Rg: higher χN
    expect(e.chiNAtPlus).toBeLessThan(base.chiN);
    expect(e.chiNSd).toBeGreaterThan(0);
  });
});

describe('the unit trap and x with its unit', () => {
  it('refuses nm read as Rg, naming --rg-nm', () => {
    const wrong: ProfileData = { ...nmData, x: nmData.xRaw, units: { x: 'Rg' } };
    expect(() => checkLengthScale(wrong, chain)).toThrow(/--rg-nm/);
    expect(() => checkLengthScale(rgData, chain)).not.toThrow();
  });

  it('reads x_nm as nm and needs an Rg for it', () => {
    const csv = 'x_nm,phiA\n0,0.9\n1,0.5\n2,0.1\n';
    expect(() => parseProfileCsv(csv, 'p.csv')).toThrow(InputError);
    expect(() => parseProfileCsv(csv, 'p.csv')).toThrow(/x_nm.*--rg-nm/);
    const d = parseProfileCsv(csv, 'p.csv', { x: 'nm', rgNm: 2, rgFrom: '--rg-nm' });
    expect(Array.from(d.x)).toEqual([0, 0.5, 1]);
  });
});

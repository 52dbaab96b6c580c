/**
 * The quadratic approximation for an uncertain f (assumed-inputs.ts: two refits at f ± sd)
 * against the exact profile likelihood over f, computed independently here, on two profiles
 * of our own at f = 0.45, χN = 15 (x in Rg): one where the data pin f themselves (80 points,
 * 2 % noise, two periods, f ± 0.02) and one where the uncertainty of f widens the interval by
 * half (40 points, 5 % noise, one period, f ± 0.03; χN responds to f far from linearly there).
 *
 * Exact profile: P(χN) = min over f of χ²(χN, f) + ((f − 0.45)/0.02)², where χ²(χN, f) is the
 * misfit of the equilibrium lamella of (χN, f) with the offset fitted (offset-fit.ts). The
 * minimum over f is taken on a grid of f (± 2.5 sd in steps of sd/2, one lamella model per f)
 * refined by the parabola through the three grid points nearest the minimum (the constraint is
 * exactly quadratic and χ²(f) is smooth on that scale). The 68.3 % ends are where P − min P = 1
 * (Cowan, Statistical Data Analysis (1998), §9.2: the profile likelihood with a Gaussian
 * constraint on the nuisance parameter).
 */
import { describe, expect, it } from 'vitest';
import { assessAssumedInputs, refitter } from '../../src/inverse/assumed-inputs.js';
import { createModels, estimateClassical } from '../../src/inverse/classical.js';
import type { ClassicalSettings } from '../../src/inverse/classical.js';
import { LamellaModel } from '../../src/inverse/lamella-model.js';
import { fitOffset } from '../../src/inverse/offset-fit.js';
import { diblock, profileEnds, synthData } from './helpers.js';

const F0 = 0.45;

interface Case {
  sd: number;
  noise: number;
  points: number;
  periods: number;
}

/** The quadratic interval, the exact one and the data-only one (68.3 %). */
function compare(c: Case) {
  // The estimator and the exact profile share one model grid (16 × 40; the data come from the
  // finer 32 × 60 of synthData): the check compares two intervals of the same model, and the
  // exact one costs 143 lamella solves per case.
  const settings: ClassicalSettings = { chain: diblock(F0), nx: 16, ns: 40, period: { mode: 'equilibrium' }, resolution: 0, profilePoints: 0 };
  const { data } = synthData({ chain: diblock(F0), chiN: 15, noise: c.noise, seed: 5, periods: c.periods, points: c.points, offset: 0.3 });
  const models = createModels(settings);
  const base = estimateClassical(data, settings, models);
  const report = assessAssumedInputs(base, [{ key: 'f', source: '--f-sd', value: F0, sd: c.sd }], refitter(data, settings, models), {});
  const quad = report.interval!;
  const fs = Array.from({ length: 11 }, (_, j) => F0 + (j - 5) * (c.sd / 2));
  const lamellae = fs.map((f) => new LamellaModel({ chain: diblock(f), nx: settings.nx, ns: settings.ns }));
  const weight = Array.from(data.sigma!, (s) => 1 / (s * s));
  const P = (chiN: number) => {
    const v = fs.map((f, j) => fitOffset(lamellae[j].equilibrium(chiN).profile, { x: data.x, phi: data.phi, weight }).value + ((f - F0) / c.sd) ** 2);
    const j = Math.min(Math.max(v.indexOf(Math.min(...v)), 1), v.length - 2);
    // Parabola through (j−1, j, j+1) on a uniform grid: its minimum value.
    const a = (v[j - 1] + v[j + 1] - 2 * v[j]) / 2;
    const b = (v[j + 1] - v[j - 1]) / 2;
    return a > 0 ? v[j] - (b * b) / (4 * a) : v[j];
  };
  const half = (quad[1] - quad[0]) / 2;
  const centre = report.chiN!;
  const step = half / 3;
  const grid = Array.from({ length: 13 }, (_, i) => centre + (i - 6) * step);
  const vals = grid.map(P);
  const exact = profileEnds(grid, vals);
  const out = { quad, centre, half, exact, halfExact: (exact[1] - exact[0]) / 2, dataOnlyHalf: (base.interval[1] - base.interval[0]) / 2 };
  console.log(`f ± ${c.sd}, ${c.points} points, noise ${c.noise}: quadratic 68.3 % [${quad[0].toFixed(4)}, ${quad[1].toFixed(4)}], exact [${exact[0].toFixed(4)}, ${exact[1].toFixed(4)}], half-widths ${half.toFixed(4)} / ${out.halfExact.toFixed(4)} = ${(half / out.halfExact).toFixed(3)}; data only ± ${out.dataOnlyHalf.toFixed(4)}; χN at f ∓ sd ${report.effects[0].chiNAtMinus.toFixed(4)}, ${report.effects[0].chiNAtPlus.toFixed(4)}`);
  return out;
}

describe('assumed inputs: f with an uncertainty, quadratic approximation against the exact profile likelihood', () => {
  it('data that pin f: the same interval within 5 %', () => {
    const r = compare({ sd: 0.02, noise: 0.02, points: 80, periods: 2 });
    expect(Math.abs(r.half / r.halfExact - 1)).toBeLessThan(0.05);
    expect(Math.abs((r.exact[0] + r.exact[1]) / 2 - r.centre)).toBeLessThan(0.1 * r.halfExact);
  });

  it('an f the data hardly constrain: the approximation is narrower than the exact interval, by less than 25 % (measured 16 %)', () => {
    const r = compare({ sd: 0.03, noise: 0.05, points: 40, periods: 1 });
    // The uncertainty in f must widen the interval well beyond the data-only one, or the check says nothing.
    expect(r.halfExact).toBeGreaterThan(1.3 * r.dataOnlyHalf);
    expect(r.half).toBeLessThan(r.halfExact);
    expect(r.half / r.halfExact).toBeGreaterThan(0.75);
    expect(Math.abs((r.exact[0] + r.exact[1]) / 2 - r.centre)).toBeLessThan(0.2 * r.halfExact);
  });
});

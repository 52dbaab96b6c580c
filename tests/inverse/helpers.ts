import { expect } from 'vitest';
import type { ChainSpec } from '../../src/physics/chain-schema.js';
import type { ClassicalSettings, ModelSet } from '../../src/inverse/classical.js';
import { estimateClassical } from '../../src/inverse/classical.js';
import type { ProfileData } from '../../src/inverse/profile-csv.js';
import type { SynthSettings } from '../../src/inverse/synth.js';
import { synthesize } from '../../src/inverse/synth.js';

export const diblock = (f: number): ChainSpec => ({ type: 'diblock', f, segmentRatio: 1 });

/** A synthetic profile as the inversion reads it (x in Rg, sigma column when noisy). */
export function synthData(s: Partial<SynthSettings> & { chain: ChainSpec; chiN: number }, models?: ModelSet, withSigma = true): { data: ProfileData; truth: ReturnType<typeof synthesize> } {
  const full: SynthSettings = { points: 64, noise: 0, seed: 1, periods: 1, offset: 0, period: 'equilibrium', resolution: 0, nx: 32, ns: 60, ...s };
  const truth = synthesize(full, models?.full);
  const data: ProfileData = {
    source: 'synthetic',
    x: truth.x,
    xRaw: truth.x,
    phi: truth.phi,
    sigma: full.noise > 0 && withSigma ? new Float64Array(full.points).fill(full.noise) : undefined,
    lines: Array.from({ length: full.points }, (_, i) => i + 2),
    units: { x: 'Rg' },
  };
  return { data, truth };
}

export function invert(data: ProfileData, s: Partial<ClassicalSettings> & { chain: ChainSpec }, models?: ModelSet) {
  return estimateClassical(data, { nx: 32, ns: 60, period: { mode: 'equilibrium' }, resolution: 0, profilePoints: 0, ...s }, models);
}

/** Distance of two offsets on a circle of circumference L. */
export function phaseDistance(a: number, b: number, L: number): number {
  const d = (((a - b) % L) + L) % L;
  return Math.min(d, L - d);
}

/**
 * The ends of a profile-likelihood interval from values P on a uniform grid: where P − min P
 * crosses `level`, by linear interpolation between grid points. Both ends must lie inside the
 * grid (checked), or the grid was too short to say.
 */
export function profileEnds(grid: number[], vals: number[], level = 1): [number, number] {
  const pMin = Math.min(...vals);
  const over = vals.map((v) => v - pMin - level);
  const first = over.findIndex((v) => v <= 0);
  const last = over.length - 1 - [...over].reverse().findIndex((v) => v <= 0);
  expect(first).toBeGreaterThan(0);
  expect(last).toBeLessThan(grid.length - 1);
  const cross = (i: number, j: number) => grid[i] + ((grid[j] - grid[i]) * over[i]) / (over[i] - over[j]);
  return [cross(first - 1, first), cross(last, last + 1)];
}

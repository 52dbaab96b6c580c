/**
 * The exact profile likelihood of χN with Rg (in nm) as a nuisance parameter under a
 * Gaussian constraint, for x in nm and the period tied to the equilibrium period:
 *   P(χN) = min over Rg of [ χ²(χN, Rg) + ((Rg − Rg₀)/s)² ]
 * (profile likelihood with a Gaussian constraint term; Cowan, Statistical Data Analysis
 * (1998), §6.11 and §9.2). At a trial χN the model is the equilibrium lamella in Rg, fixed,
 * and Rg only rescales the data (x/Rg) and the resolution, so each Rg costs one offset fit
 * and no solve. The inner minimum over Rg is by golden section over Rg₀ ± 5 s. χ² uses the
 * sigma column, or the base fit's estimated sigma (σ̂² fixed at its value with Rg = Rg₀).
 */
import type { ClassicalEstimate, ClassicalSettings, ModelSet } from './classical.js';
import { defaultChiNRange } from './classical.js';
import { deltaChi2Level, LEVELS } from './confidence.js';
import { fitOffset } from './offset-fit.js';
import type { ProfileData } from './profile-csv.js';
import type { ProfiledPoint } from './profile-likelihood.js';
import { intervalEnd, refineMinimum } from './profile-likelihood.js';

export interface RgProfile {
  chiN: number;
  rgNm: number;
  intervals: ClassicalEstimate['intervals'];
  evaluations: number;
}

export function exactRgProfile(data: ProfileData, settings: ClassicalSettings, models: ModelSet, base: ClassicalEstimate, rg0: number, sd: number): RgProfile {
  const weight = data.sigma ? data.sigma.map((s) => 1 / (s * s)) : new Float64Array(data.x.length).fill(1);
  const scale = data.sigma ? 1 : base.sigma.value! ** 2;
  const resolutionNm = settings.resolution * rg0;
  const memo = new Map<number, ProfiledPoint & { rg: number }>();
  const fn = (chiN: number) => {
    const hit = memo.get(chiN);
    if (hit) return hit;
    const point = models.full.equilibrium(chiN);
    const value = (rg: number) => {
      if (!(rg > 0)) return Infinity;
      const prof = point.profile.blurred(resolutionNm / rg);
      return fitOffset(prof, { x: data.xRaw.map((v) => v / rg), phi: data.phi, weight }).value / scale + ((rg - rg0) / sd) ** 2;
    };
    let a = Math.max(rg0 - 5 * sd, 1e-3 * rg0);
    let b = rg0 + 5 * sd;
    for (let i = 0; i < 50; i++) {
      const c = b - 0.6180339887 * (b - a);
      const d = a + 0.6180339887 * (b - a);
      if (value(c) < value(d)) b = d;
      else a = c;
    }
    const rg = (a + b) / 2;
    const out = { chiN, value: point.phase === 'lamellar' ? value(rg) : Infinity, rg };
    memo.set(chiN, out);
    return out;
  };
  const range = settings.chiNRange ?? defaultChiNRange(settings.chain);
  const search = { range, rangeSource: settings.rangeSource ?? '--chiN-range', scanPoints: 8, relTol: 1e-7 };
  const start = refineMinimum(fn, search, base.chiN, 2e-3);
  const best = fn(start.chiN);
  const intervals = {} as ClassicalEstimate['intervals'];
  for (const level of LEVELS) {
    const d = deltaChi2Level(level, !data.sigma, base.dof);
    const known = [...memo.values()].filter((p) => Number.isFinite(p.value));
    const hi = intervalEnd(fn, best, d, 1, range, known);
    const lo = intervalEnd(fn, best, d, -1, range, [...memo.values()].filter((p) => Number.isFinite(p.value)));
    intervals[level.name] = { lo: lo.chiN, hi: hi.chiN, probability: level.probability, deltaChi2: d, limitedByRange: { lo: lo.limitedByRange, hi: hi.limitedByRange } };
  }
  return { chiN: best.chiN, rgNm: best.rg, intervals, evaluations: memo.size };
}

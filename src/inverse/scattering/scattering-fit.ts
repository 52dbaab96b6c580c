/**
 * χN (and Rg, K, bg) of a disordered melt from its small-angle scattering I(q), by a
 * weighted least-squares fit of Leibler's RPA (rpa-intensity.ts), with profile-likelihood
 * intervals for χN (profile-likelihood.ts; levels from confidence.ts).
 *
 * Units: q in nm⁻¹, Rg in nm; χN dimensionless (χ times the N of the reference volume).
 *
 * Rg is free, fixed, or constrained by a Gaussian prior of mean Rg₀ and standard deviation
 * s: the nuisance parameter is profiled out with the constraint term ((Rg − Rg₀)/s)² added
 * to χ² (profile likelihood with a Gaussian constraint term; Cowan, Statistical Data
 * Analysis (1998), §6.11 and §9.2 on nuisance parameters). K and bg are profiled exactly by
 * linear least squares at every (χN, Rg).
 *
 * Without a dI column, χ² uses σ̂² = RSS_min/(n − p) from a first fit without the
 * constraint term (p counts χN, K, bg and Rg when it is not fixed) and the interval levels
 * are t²_{n−p} quantiles (confidence.ts).
 *
 * In RPA the peak position q*Rg does not depend on χN (N/S = G(x) − 2χN), so the peak fixes
 * Rg and the peak's height against its width fixes χN. Near the spinodal S diverges; a best
 * fit at the spinodal (an ordered sample's Bragg peak is narrower than any RPA peak) is
 * refused: the mean-field disordered-melt model does not describe those data.
 */
import { InputError } from '../../io/errors.js';
import { bracketMinimum, brentMinimize } from '../../numerics/brent-minimize.js';
import type { ChainSpec } from '../../physics/chain-schema.js';
import { buildChain } from '../../physics/chain.js';
import { spinodal } from '../../physics/rpa.js';
import { deltaChi2Level, LEVELS } from '../confidence.js';
import { reducedChi2Warning } from '../fit-quality.js';
import type { FitStatistics } from '../fit-quality.js';
import type { ProfiledPoint } from '../profile-likelihood.js';
import { intervalEnd } from '../profile-likelihood.js';
import { linearFit, RpaIntensity } from './rpa-intensity.js';
import type { ScatteringData } from './scattering-csv.js';

export type RgSetting = { mode: 'free' } | { mode: 'fixed'; value: number } | { mode: 'constrained'; value: number; sd: number };

export interface ScatteringFitSettings {
  chain: ChainSpec;
  /** Rg in nm. */
  rg: RgSetting;
  /** Gaussian q resolution (standard deviation) in nm⁻¹; 0 for none. */
  resolution: number;
  /** χN search range; default [−(χN)_s, (χN)_s]. */
  chiNRange?: [number, number];
  /** Flag or config path names used in error messages. */
  rgSource?: string;
  /** Extra points on the drawn profile-likelihood curve. */
  profilePoints?: number;
}

export interface ScatteringInterval {
  lo: number;
  hi: number;
  probability: number;
  deltaChi2: number;
  /** An end at the search bound: the interval is open there (the upper bound is the spinodal). */
  limitedByRange: { lo: boolean; hi: boolean };
}

export interface ScatteringFit extends FitStatistics {
  source: string;
  chiN: number;
  interval: [number, number];
  interval95: [number, number];
  intervals: Record<'68.3%' | '95%', ScatteringInterval>;
  /** Rg in nm at the best fit, and how it was set. */
  rgNm: number;
  rgMode: RgSetting['mode'];
  K: number;
  background: number;
  chiNSpinodal: number;
  /** Peak position of the model without resolution, q* = sqrt(x*)/Rg (nm⁻¹). */
  qStarPerNm: number;
  chiNRange: [number, number];
  resolution: number;
  /** Model at the data points (units of I), residual = data − model, and residual/σ. */
  model: Float64Array;
  residual: Float64Array;
  normalisedResidual: Float64Array;
  profile: { chiN: number; deltaChi2: number; rgNm: number }[];
  warnings: string[];
  notes: string[];
  evaluations: number;
  seconds: number;
}

interface Eval extends ProfiledPoint {
  rg: number;
  K: number;
  background: number;
  rss: number;
}

const SCAN = 25;

export function fitScattering(data: ScatteringData, s: ScatteringFitSettings): ScatteringFit {
  const t0 = performance.now();
  const chain = buildChain(s.chain);
  const sp = spinodal(chain);
  const n = data.q.length;
  const rgSource = s.rgSource ?? '--rg-nm';
  const p = 3 + (s.rg.mode === 'fixed' ? 0 : 1);
  if (n <= p) throw new InputError(`${data.source}: ${n} data point(s), but the fit has ${p} unknowns (χN, K, background${s.rg.mode === 'fixed' ? '' : ', Rg'}); give at least ${p + 1} points`);
  const hi = sp.chiN * (1 - 1e-6);
  const range: [number, number] = s.chiNRange ?? [-sp.chiN, hi];
  if (range[1] > hi) range[1] = hi;
  const weights = data.sigma ? data.sigma.map((v) => 1 / (v * v)) : new Float64Array(n).fill(1);
  const model = new RpaIntensity(chain, data.q, s.resolution);
  const xStar = sp.qRg * sp.qRg;

  // The peak of the data fixes Rg through q*Rg = sqrt(x*); without a peak inside the q range,
  // only a given Rg can.
  let iMax = 0;
  for (let i = 1; i < n; i++) if (data.intensity[i] > data.intensity[iMax]) iMax = i;
  if (s.rg.mode === 'free' && (iMax === 0 || iMax === n - 1)) {
    throw new InputError(
      `${data.source}: the highest intensity is at the ${iMax === 0 ? 'lowest' : 'highest'} q of the file, so the data do not show the correlation-hole peak whose position fixes Rg; give Rg (${rgSource} R, optionally with ${rgSource}-sd S) or data across the peak`,
    );
  }
  const rgStart = s.rg.mode === 'free' ? sp.qRg / data.q[iMax] : s.rg.value;
  const rgLo = rgStart / 4;
  const rgHi = rgStart * 4;

  const shapeBuf = new Float64Array(n);
  const atRg = (chiN: number, rg: number, scale: number, withPrior: boolean) => {
    const shape = model.shape(chiN, rg, shapeBuf);
    if (!shape) return { value: Infinity, K: NaN, background: NaN, rss: Infinity };
    const lf = linearFit(shape, data.intensity, weights);
    const prior = withPrior && s.rg.mode === 'constrained' ? ((rg - s.rg.value) / s.rg.sd) ** 2 : 0;
    return { value: lf.rss / scale + prior, ...lf };
  };

  let evaluations = 0;
  const profiled = (scale: number, withPrior: boolean, rgFree: boolean) => {
    const memo = new Map<number, Eval>();
    const list: Eval[] = [];
    const fn = (chiN: number): Eval => {
      const hit = memo.get(chiN);
      if (hit) return hit;
      evaluations++;
      let ev: Eval;
      if (!rgFree) {
        const rg = (s.rg as { value: number }).value;
        ev = { chiN, rg, ...atRg(chiN, rg, scale, withPrior) };
      } else {
        // Warm start from the nearest χN already profiled.
        let start = rgStart;
        let dBest = Infinity;
        for (const e of list) {
          const d = Math.abs(e.chiN - chiN);
          if (d < dBest && Number.isFinite(e.value)) {
            dBest = d;
            start = e.rg;
          }
        }
        const g = (u: number) => atRg(chiN, Math.exp(u), scale, withPrior).value;
        const u0 = Math.log(start);
        let u: number;
        try {
          const br = bracketMinimum(g, u0, u0 + 0.01, Math.log(rgLo), Math.log(rgHi), 60);
          u = brentMinimize(g, br, 1e-9).x;
        } catch {
          u = g(Math.log(rgLo)) < g(Math.log(rgHi)) ? Math.log(rgLo) : Math.log(rgHi);
        }
        const rg = Math.exp(u);
        ev = { chiN, rg, ...atRg(chiN, rg, scale, withPrior) };
      }
      memo.set(chiN, ev);
      list.push(ev);
      return ev;
    };
    return { fn, list };
  };

  const minimise = (fn: (c: number) => Eval): Eval => {
    const grid = Array.from({ length: SCAN }, (_, i) => range[0] + ((range[1] - range[0]) * i) / (SCAN - 1));
    const vals = grid.map((c) => fn(c).value);
    let b = 0;
    for (let i = 1; i < SCAN; i++) if (vals[i] < vals[b]) b = i;
    if (b === SCAN - 1 || !Number.isFinite(vals[b])) {
      // The best point may sit inside the last cell: try a finer look before refusing.
      const sub = Array.from({ length: 9 }, (_, i) => grid[SCAN - 2] + ((range[1] - grid[SCAN - 2]) * i) / 8);
      const sv = sub.map((c) => fn(c).value);
      let j = 0;
      for (let i = 1; i < sv.length; i++) if (sv[i] < sv[j]) j = i;
      if (j === sv.length - 1) throw spinodalError(data.source, sp.chiN);
      if (j === 0) return fn(brentMinimize((c) => fn(c).value, { a: grid[SCAN - 3], b: sub[0], c: sub[1], fb: sv[0] }, 1e-10).x);
      return fn(brentMinimize((c) => fn(c).value, { a: sub[j - 1], b: sub[j], c: sub[j + 1], fb: sv[j] }, 1e-10).x);
    }
    if (b === 0) {
      throw new InputError(
        `${data.source}: the best fit runs to the lower bound χN = ${range[0].toPrecision(4)} of the search range: the data show no correlation-hole peak the RPA of this chain can describe (check f, the chain and the q units)`,
      );
    }
    return fn(brentMinimize((c) => fn(c).value, { a: grid[b - 1], b: grid[b], c: grid[b + 1], fb: vals[b] }, 1e-10).x);
  };

  const notes: string[] = [];
  const warnings: string[] = [];
  const dof = n - p;
  let scale = 1;
  let sigma: ScatteringFit['sigma'] = { source: 'column', value: null };
  if (!data.sigma) {
    const first = profiled(1, false, s.rg.mode !== 'fixed');
    const b = minimise(first.fn);
    scale = b.rss / dof;
    sigma = { source: 'estimated', value: Math.sqrt(scale) };
    notes.push('no dI column: sigma estimated from the residuals, σ̂² = RSS_min/(n − p) with equal weights; the interval assumes equal, independent Gaussian errors and uses t-distribution levels');
  }
  const main = profiled(scale, true, s.rg.mode !== 'fixed');
  const best = minimise(main.fn);
  // Within 0.1 % of the spinodal the fit is at the bound in all but name: no disordered melt
  // is observed that close to it (fluctuations order it first), and an ordered peak lands here.
  if (best.chiN > sp.chiN * (1 - 1e-3)) throw spinodalError(data.source, sp.chiN);
  if (!(best.K > 0)) throw new InputError(`${data.source}: the best fit has a contrast factor K = ${best.K.toPrecision(3)} ≤ 0: the intensity does not rise towards a peak the way a disordered melt scatters`);

  const intervals = {} as ScatteringFit['intervals'];
  for (const level of LEVELS) {
    const d = deltaChi2Level(level, !data.sigma, dof);
    const up = intervalEnd(main.fn, best, d, 1, range, main.list);
    const lo = intervalEnd(main.fn, best, d, -1, range, main.list);
    intervals[level.name] = { lo: lo.chiN, hi: up.chiN, probability: level.probability, deltaChi2: d, limitedByRange: { lo: lo.limitedByRange, hi: up.limitedByRange } };
    if (up.limitedByRange) notes.push(`the ${level.name} interval reaches the spinodal (χN)_s = ${sp.chiN.toPrecision(5)}: it is open on that side`);
  }
  const i95 = intervals['95%'];
  const width = i95.hi - i95.lo;
  const extra = s.profilePoints ?? 15;
  for (let k = 0; k < extra; k++) {
    const c = i95.lo - 0.3 * width + (1.6 * width * k) / Math.max(1, extra - 1);
    if (c > range[0] && c < range[1]) main.fn(c);
  }
  const profile = main.list
    .filter((e) => e.chiN >= i95.lo - 0.35 * width && e.chiN <= i95.hi + 0.35 * width && Number.isFinite(e.value))
    .sort((a, b) => a.chiN - b.chiN)
    .map((e) => ({ chiN: e.chiN, deltaChi2: Math.max(0, e.value - best.value), rgNm: e.rg }));

  const shape = model.shape(best.chiN, best.rg)!;
  const fitted = shape.map((v) => best.K * v + best.background);
  const residual = fitted.map((v, i) => data.intensity[i] - v);
  const sd = data.sigma ?? new Float64Array(n).fill(Math.sqrt(scale));
  const normalisedResidual = residual.map((r, i) => r / sd[i]);
  const chi2 = best.rss / scale;
  if (data.sigma) {
    const w = reducedChi2Warning(chi2 / dof, dof, 'these data');
    if (w) warnings.push(w);
  }
  if (s.rg.mode === 'constrained') notes.push(`Rg constrained to ${s.rg.value} ± ${s.rg.sd} nm (Gaussian constraint term in χ², profiled at each χN)`);
  if (best.chiN > 0.8 * sp.chiN) notes.push(`χN is within 20 % of the spinodal (${sp.chiN.toPrecision(5)}): composition fluctuations, which mean-field RPA leaves out, matter here; the fitted χN is an effective one`);
  return {
    source: data.source,
    chiN: best.chiN,
    interval: [intervals['68.3%'].lo, intervals['68.3%'].hi],
    interval95: [i95.lo, i95.hi],
    intervals,
    rgNm: best.rg,
    rgMode: s.rg.mode,
    K: best.K,
    background: best.background,
    chiNSpinodal: sp.chiN,
    qStarPerNm: Math.sqrt(xStar) / best.rg,
    chi2,
    reducedChi2: chi2 / dof,
    n,
    p,
    dof,
    sigma,
    chiNRange: range,
    resolution: s.resolution,
    model: fitted,
    residual,
    normalisedResidual,
    profile,
    warnings,
    notes,
    evaluations,
    seconds: (performance.now() - t0) / 1000,
  };
}

function spinodalError(source: string, chiNs: number): InputError {
  return new InputError(
    `${source}: the best fit runs to the RPA spinodal (χN)_s = ${chiNs.toPrecision(5)}: the peak is sharper than any disordered melt of this chain gives. The sample is ordered (a Bragg peak) or at or beyond the spinodal, where the RPA of the disordered melt does not apply; fit the Bragg peaks instead, or leave this temperature out`,
  );
}

/**
 * χN and the period D of an ordered lamellar sample from its measured Bragg peaks.
 *
 * Units: q in nm⁻¹ (converted from the file), D in nm; χN dimensionless.
 *
 * Positions: q_n = 2πn/D, so 1/D is the weighted least-squares slope of q_n against 2πn
 * (weights 1/dq², or equal weights with the scatter estimated when there is no dq column);
 * positions carry no information on χN once D is free (D in nm is Rg × L_eq(χN), and Rg is
 * not assumed here).
 * Intensities: I_n ≈ K·r_n(χN), r_n the relative intensities of the mean-field lamella at its
 * stress-free period (bragg-pattern.ts; spectral reference through lamella-model.ts), K
 * profiled by linear least squares; χN by the profile likelihood of
 *   χ²(χN) = min_K Σ ((I_n − K r_n(χN))/dI_n)²
 * (profile-likelihood.ts, levels of confidence.ts). The relative intensities saturate in
 * strong segregation (they approach the sharp-interface form), so at large χN the interval
 * opens towards the upper bound of the range: the output says so.
 *
 * Period tied to a given Rg (settings.rg): the measured D then also constrains χN through
 * D = Rg·L_eq(χN). Its term in χ² is (D − R·L)² / (sd_D² + L²·sd_R²): the exact profile over
 * Rg under a Gaussian constraint N(R, sd_R²), because the model is linear in Rg (minimising
 * ((D − Rg·L)/sd_D)² + ((Rg − R)/sd_R)² over Rg gives that expression). sd_D is the standard
 * deviation of D from the positions. It adds one datum; the constrained Rg adds a datum and a
 * parameter, so dof = orders − 1.
 */
import { InputError } from '../../io/errors.js';
import { formatNumber } from '../../io/number-format.js';
import type { ChainSpec } from '../../physics/chain-schema.js';
import type { SpectralOptions } from '../../io/schemas/spectral-schema.js';
import { deltaChi2Level, LEVELS } from '../confidence.js';
import { reducedChi2Warning } from '../fit-quality.js';
import { defaultChiNRange } from '../classical.js';
import { LamellaModel } from '../lamella-model.js';
import type { ProfiledPoint } from '../profile-likelihood.js';
import { intervalEnd, refineMinimum, scanMinimum } from '../profile-likelihood.js';
import { braggPeaks } from './bragg-pattern.js';

export interface MeasuredPeaks {
  source: string;
  order: number[];
  /** q in nm⁻¹. */
  q: number[];
  dq?: number[];
  intensity: number[];
  dI: number[];
}

export interface BraggFitSettings {
  chain: ChainSpec;
  nx: number;
  ns: number;
  lorentz: boolean;
  /** Solver settings of the model solves (defaults of the spectral reference otherwise). */
  options?: Partial<SpectralOptions>;
  chiNRange?: [number, number];
  rangeSource?: string;
  /** Tie D to this Rg (nm), with an optional standard deviation (nm); `source` names the flag or config key in messages. */
  rg?: { nm: number; sd?: number; source: string };
  /** Called after each model evaluation (progress). */
  onEvaluation?: (evaluations: number, chiN: number, chi2: number) => void;
}

/** The period term of the Rg-tied fit at the best χN. */
export interface RgTie {
  rgNm: number;
  rgNmSd: number | null;
  /** R·L_eq(χN) at the best χN, nm. */
  periodModelNm: number;
  /** (D − R·L)/sqrt(sd_D² + L²·sd_R²) at the best χN. */
  pull: number;
}

export interface BraggFit {
  chiN: number;
  intervals: Record<'68.3%' | '95%', { lo: number; hi: number; limitedByRange: { lo: boolean; hi: boolean } }>;
  periodNm: number;
  periodNmSd: number;
  K: number;
  chi2: number;
  dof: number;
  /** Model relative intensities at the best χN, and the model I_n = K r_n. */
  model: { order: number; relative: number; intensity: number }[];
  /** The equilibrium period in Rg at the best χN, and the Rg in nm it implies with the measured D. */
  periodRg: number;
  impliedRgNm: number;
  profile: { chiN: number; deltaChi2: number }[];
  /** Present when D was tied to a given Rg. */
  rgTie: RgTie | null;
  evaluations: number;
  notes: string[];
  seconds: number;
}

export function fitBragg(data: MeasuredPeaks, s: BraggFitSettings): BraggFit {
  const t0 = performance.now();
  const n = data.order.length;
  if (n < 2) throw new InputError(`${data.source}: ${n} peak(s); the fit needs at least two orders (the intensities relative to each other fix χN)`);
  // Period from positions.
  const w = data.dq ? data.dq.map((d) => 1 / (d * d)) : data.q.map(() => 1);
  let sxx = 0;
  let sxy = 0;
  for (let i = 0; i < n; i++) {
    const x = 2 * Math.PI * data.order[i];
    sxx += w[i] * x * x;
    sxy += w[i] * x * data.q[i];
  }
  const u = sxy / sxx;
  let rss = 0;
  for (let i = 0; i < n; i++) rss += w[i] * (data.q[i] - 2 * Math.PI * data.order[i] * u) ** 2;
  const varU = (data.dq ? 1 : rss / Math.max(1, n - 1)) / sxx;
  const periodNm = 1 / u;
  const periodNmSd = Math.sqrt(varU) / (u * u);

  const model = new LamellaModel({ chain: s.chain, nx: s.nx, ns: s.ns, options: s.options });
  const maxOrder = Math.max(...data.order);
  const rel = (chiN: number) => {
    const pt = model.equilibrium(chiN);
    if (pt.phase !== 'lamellar') return null;
    const p = braggPeaks(pt.profile, 1, maxOrder, s.lorentz);
    return { r: data.order.map((o) => p.peaks[o - 1].relative), period: pt.period };
  };
  const wI = data.dI.map((d) => 1 / (d * d));
  const tie = s.rg;
  // Positions on an exact q_n = 2πn/D line (no dq column) leave only round-off in sd_D.
  if (tie && !(periodNmSd > 1e-9 * periodNm) && !(tie.sd && tie.sd > 0)) {
    throw new InputError(`${tie.source}: the period is tied to Rg, but neither D nor Rg has an uncertainty (${n} peak positions fit q_n = 2πn/D exactly and there is no dq column): give Rg's standard deviation (--rg-nm-sd) or a dq column`);
  }
  const periodTerm = (L: number) => {
    if (!tie) return 0;
    const v = periodNmSd * periodNmSd + L * L * (tie.sd ?? 0) ** 2;
    return (periodNm - tie.nm * L) ** 2 / v;
  };
  let evaluations = 0;
  const cache = new Map<number, ProfiledPoint & { K: number; r: number[]; period: number }>();
  const fn = (chiN: number) => {
    const hit = cache.get(chiN);
    if (hit) return hit;
    const m = rel(chiN);
    let out;
    if (!m) out = { chiN, value: Infinity, K: NaN, r: [], period: NaN };
    else {
      let a = 0;
      let b = 0;
      for (let i = 0; i < n; i++) {
        a += wI[i] * m.r[i] * data.intensity[i];
        b += wI[i] * m.r[i] * m.r[i];
      }
      const K = a / b;
      let v = periodTerm(m.period);
      for (let i = 0; i < n; i++) v += wI[i] * (data.intensity[i] - K * m.r[i]) ** 2;
      out = { chiN, value: v, K, r: m.r, period: m.period };
    }
    cache.set(chiN, out);
    s.onEvaluation?.(++evaluations, chiN, out.value);
    return out;
  };
  const range = s.chiNRange ?? defaultChiNRange(s.chain);
  const search = { range, rangeSource: s.rangeSource ?? '--chiN-range', scanPoints: 8, relTol: 1e-6 };
  const guess = scanMinimum(fn, search, 1e-5);
  const best = refineMinimum(fn, search, guess, 2e-3);
  const b = fn(best.chiN);
  const dof = tie ? n - 1 : n - 2;
  const notes: string[] = [];
  const intervals = {} as BraggFit['intervals'];
  const known = () => [...cache.values()].filter((p) => Number.isFinite(p.value));
  for (const level of LEVELS) {
    const d = deltaChi2Level(level, false, dof);
    const hi = intervalEnd(fn, b, d, 1, range, known());
    const lo = intervalEnd(fn, b, d, -1, range, known());
    intervals[level.name] = { lo: lo.chiN, hi: hi.chiN, limitedByRange: { lo: lo.limitedByRange, hi: hi.limitedByRange } };
    if (hi.limitedByRange) notes.push(`the ${level.name} interval reaches the upper bound of the χN range: ${tie ? 'the relative intensities saturate in strong segregation and D grows only as about (χN)^(1/6)' : 'the relative intensities saturate in strong segregation'}, so these peaks set only a lower limit on χN`);
  }
  const poor = dof > 0 ? reducedChi2Warning(b.value / dof, dof, 'these peak intensities') : undefined;
  if (poor) notes.unshift(`WARNING: ${poor}`);
  let rgTie: RgTie | null = null;
  if (tie) {
    const L = b.period;
    rgTie = { rgNm: tie.nm, rgNmSd: tie.sd ?? null, periodModelNm: tie.nm * L, pull: (periodNm - tie.nm * L) / Math.sqrt(periodNmSd * periodNmSd + L * L * (tie.sd ?? 0) ** 2) };
    notes.push(`the period is tied to Rg = ${formatNumber(tie.nm)} nm${tie.sd ? ` ± ${formatNumber(tie.sd)} nm (profiled out under its Gaussian constraint)` : ' (taken as exact)'}: the measured D = ${periodNm.toPrecision(5)} nm pulls χN through D = Rg·L_eq(χN); an error in Rg moves χN (D grows about as (χN)^(1/6) in strong segregation, so 1 % in Rg is about 6 % in χN there)`);
  }
  notes.push('thermal disorder and grain-size effects damp higher orders (a Debye–Waller-like factor) and bias χN low');
  const profile = known()
    .sort((p, q) => p.chiN - q.chiN)
    .map((p) => ({ chiN: p.chiN, deltaChi2: p.value - b.value }));
  return {
    chiN: b.chiN,
    intervals,
    periodNm,
    periodNmSd,
    K: b.K,
    chi2: b.value,
    dof,
    model: data.order.map((o, i) => ({ order: o, relative: b.r[i], intensity: b.K * b.r[i] })),
    periodRg: b.period,
    impliedRgNm: periodNm / b.period,
    profile,
    rgTie,
    evaluations,
    notes,
    seconds: (performance.now() - t0) / 1000,
  };
}

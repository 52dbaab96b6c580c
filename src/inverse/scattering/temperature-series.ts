/**
 * χ(T) from χN fitted at several temperatures: the weighted least-squares line
 *   χN(T) = a/T + b,  and with N given  χ(T) = A/T + B,  A = a/N, B = b/N,
 * each χN weighted by 1/σ², σ its 68.3 % profile-likelihood half-width (the mean of the two
 * sides). The covariance of (a, b) is (XᵀWX)⁻¹, so intervals are a ± z σ_a (z = 1, 1.96);
 * the reduced χ² of the line tells whether the per-temperature uncertainties explain its
 * scatter. Units: T in K, A in K, B dimensionless.
 *
 * The mean-field transition temperature: T with a/T + b = c, T = a/(c − b), where c is the
 * mean-field (χN) at the transition of this chain (the RPA spinodal; for the symmetric
 * diblock it is also the mean-field order–disorder point, Leibler 1980). Its interval by
 * Fieller's theorem for the ratio a/(c − b) (numerics/fieller.ts).
 *
 * With the invariant degree of polymerisation N̄ given, the fluctuation-corrected estimate
 * for symmetric diblocks, (χN)_ODT = 10.495 + 41.022 N̄^(−1/3) (Fredrickson & Helfand,
 * J. Chem. Phys. 87, 697 (1987)), gives a second transition temperature, labelled as such.
 */
import { InputError } from '../../io/errors.js';
import type { FiellerSet } from '../../numerics/fieller.js';
import { fiellerInterval } from '../../numerics/fieller.js';
import { LEVELS } from '../confidence.js';
import { reducedChi2Warning } from '../fit-quality.js';

export interface SeriesPoint {
  temperature: number;
  chiN: number;
  /** 68.3 % interval of χN at this temperature. */
  interval: [number, number];
  source: string;
}

export interface TransitionEstimate {
  label: string;
  chiN: number;
  temperature: number;
  intervals: Record<'68.3%' | '95%', FiellerSet>;
}

export interface TemperatureSeriesFit {
  a: number;
  b: number;
  covariance: { aa: number; bb: number; ab: number };
  intervals: { a: Record<'68.3%' | '95%', [number, number]>; b: Record<'68.3%' | '95%', [number, number]> };
  /** χ(T) = A/T + B when N is given. */
  chi?: { N: number; A: number; B: number; intervals: { A: Record<'68.3%' | '95%', [number, number]>; B: Record<'68.3%' | '95%', [number, number]> } };
  chi2: number;
  dof: number;
  reducedChi2: number | null;
  meanField: TransitionEstimate;
  fluctuationCorrected?: TransitionEstimate & { nbar: number };
  /** χN ± sd of the line at T (for a band). */
  band: (T: number) => { chiN: number; sd: number };
  warnings: string[];
  notes: string[];
}

export interface SeriesSettings {
  /** (χN) at the mean-field transition of the chain (the RPA spinodal). */
  chiNTransition: number;
  transitionLabel: string;
  segments?: number;
  nbar?: number;
  /** True for a symmetric (f = 1/2, equal segment lengths) diblock: the only case Fredrickson–Helfand covers. */
  symmetricDiblock: boolean;
}

export const FH_CAUTION =
  'mean-field RPA fitted near the transition gives an effective χ: composition fluctuations (left out by mean-field theory) lower the peak intensity, so χ fitted close to the transition is biased and its temperature dependence is not the bare A/T + B';

export function fitTemperatureSeries(points: SeriesPoint[], s: SeriesSettings): TemperatureSeriesFit {
  const temps = new Set(points.map((p) => p.temperature));
  if (temps.size < 2) throw new InputError(`temperature series: ${points.length} file(s) at ${temps.size} distinct temperature(s); χ(T) = A/T + B needs at least two temperatures (three to check the fit)`);
  let s00 = 0;
  let s01 = 0;
  let s11 = 0;
  let r0 = 0;
  let r1 = 0;
  const w: number[] = [];
  for (const p of points) {
    const sd = (p.interval[1] - p.interval[0]) / 2;
    if (!(sd > 0)) throw new InputError(`${p.source}: χN interval of zero width; cannot weight it in the χ(T) fit`);
    const wi = 1 / (sd * sd);
    w.push(wi);
    const u = 1 / p.temperature;
    s00 += wi * u * u;
    s01 += wi * u;
    s11 += wi;
    r0 += wi * u * p.chiN;
    r1 += wi * p.chiN;
  }
  const det = s00 * s11 - s01 * s01;
  const a = (r0 * s11 - s01 * r1) / det;
  const b = (s00 * r1 - s01 * r0) / det;
  const cov = { aa: s11 / det, bb: s00 / det, ab: -s01 / det };
  let chi2 = 0;
  points.forEach((p, i) => {
    const r = p.chiN - (a / p.temperature + b);
    chi2 += w[i] * r * r;
  });
  const dof = points.length - 2;
  const iv = (m: number, v: number) => Object.fromEntries(LEVELS.map((l) => [l.name, [m - l.z * Math.sqrt(v), m + l.z * Math.sqrt(v)]])) as Record<'68.3%' | '95%', [number, number]>;
  const warnings: string[] = [];
  const notes: string[] = [FH_CAUTION];
  if (dof > 0) {
    const wmsg = reducedChi2Warning(chi2 / dof, dof, 'χN(T) as a/T + b');
    if (wmsg) warnings.push(wmsg);
  } else notes.push('two temperatures: the line passes through both, so nothing checks that χ is linear in 1/T');

  const transition = (label: string, c: number): TransitionEstimate => {
    // T = a/(c − b): numerator a, denominator c − b, cov(a, c − b) = −cov(a, b).
    const d = c - b;
    return {
      label,
      chiN: c,
      temperature: a / d,
      intervals: Object.fromEntries(LEVELS.map((l) => [l.name, fiellerInterval(a, d, cov.aa, cov.bb, -cov.ab, l.z)])) as Record<'68.3%' | '95%', FiellerSet>,
    };
  };
  const meanField = transition(s.transitionLabel, s.chiNTransition);
  let fluctuationCorrected;
  if (s.nbar !== undefined) {
    if (!s.symmetricDiblock) notes.push('the Fredrickson–Helfand estimate is derived for symmetric diblocks; this chain is not one, so that temperature is indicative only');
    const c = 10.495 + 41.022 * Math.pow(s.nbar, -1 / 3);
    fluctuationCorrected = { ...transition(`Fredrickson–Helfand fluctuation-corrected ODT, (χN)_ODT = 10.495 + 41.022 N̄^(−1/3) at N̄ = ${s.nbar}`, c), nbar: s.nbar };
  }
  for (const t of [meanField, fluctuationCorrected]) {
    if (t && t.intervals['95%'].kind === 'unbounded') notes.push(`${t.label}: the 95 % Fieller set is unbounded (the slope of χN against 1/T is not significantly different from what would put the transition anywhere): no finite temperature interval`);
    if (t && !(t.temperature > 0)) warnings.push(`${t.label}: the line a/T + b never reaches χN = ${t.chiN.toPrecision(5)} at a positive temperature (T = ${t.temperature.toPrecision(4)})`);
  }
  const chi = s.segments
    ? { N: s.segments, A: a / s.segments, B: b / s.segments, intervals: { A: iv(a / s.segments, cov.aa / s.segments ** 2), B: iv(b / s.segments, cov.bb / s.segments ** 2) } }
    : undefined;
  if (!s.segments) notes.push('N not given (--segments): the line is reported for χN; χ = χN/N');
  return {
    a,
    b,
    covariance: cov,
    intervals: { a: iv(a, cov.aa), b: iv(b, cov.bb) },
    chi,
    chi2,
    dof,
    reducedChi2: dof > 0 ? chi2 / dof : null,
    meanField,
    fluctuationCorrected,
    band: (T: number) => ({ chiN: a / T + b, sd: Math.sqrt(cov.aa / (T * T) + 2 * cov.ab / T + cov.bb) }),
    warnings,
    notes,
  };
}

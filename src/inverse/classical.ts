/**
 * The classical estimator: fit the spectral reference lamella to a measured profile with
 * χN and the phase offset x0 as unknowns (and the period, when free), minimising
 *   χ² = Σ ((φ_model(x_i − x0) − φ_i)/σ_i)²,
 * and report χN with profile-likelihood intervals (confidence.ts, profile-likelihood.ts).
 * Without a sigma column the fit uses unit weights and σ̂² = RSS_min/(n − p).
 */
import { InputError } from '../io/errors.js';
import type { SpectralOptions } from '../io/schemas/spectral-schema.js';
import { median } from '../numerics/median.js';
import type { ChainSpec } from '../physics/chain-schema.js';
import { buildChain } from '../physics/chain.js';
import type { ScftSolution } from '../physics/result.js';
import { spinodal } from '../physics/rpa.js';
import { deltaChi2Level, LEVELS } from './confidence.js';
import { reducedChi2Warning } from './fit-quality.js';
import { LamellaModel } from './lamella-model.js';
import type { Evaluation, PeriodMode } from './objective.js';
import { Objective, periodogramPeriod } from './objective.js';
import type { FitData } from './offset-fit.js';
import type { ProfileData } from './profile-csv.js';
import { intervalEnd, refineMinimum, scanMinimum } from './profile-likelihood.js';
import { FourierSeries } from '../physics/cell/fourier-series.js';

export interface ClassicalSettings {
  chain: ChainSpec;
  nx: number;
  ns: number;
  solver?: Partial<SpectralOptions>;
  /** Period mode, lengths in Rg. */
  period: PeriodMode;
  /** Search range of χN; default [1.01 (χN)_s, 60]. */
  chiNRange?: [number, number];
  /** Gaussian instrument resolution (standard deviation) in Rg; 0 for none. */
  resolution: number;
  /** Extra evenly spaced points on the drawn profile-likelihood curve. */
  profilePoints: number;
  /** Names used in error messages for the period and range settings. */
  periodSource?: string;
  rangeSource?: string;
  /** Progress: called after each χN evaluation, with the stage it belongs to. */
  onEvaluation?: (stage: 'scan' | 'refine' | 'interval' | 'curve', e: Evaluation) => void;
}

/** Models (and their caches) that several fits of the same system may share. */
export interface ModelSet {
  full: LamellaModel;
  /** A cheap model for the initial scan of the χN range (same as full when that is cheap already). */
  coarse: LamellaModel;
}

/** Residuals below this are at the model's numerical precision: an estimated sigma is not taken smaller. */
export const SIGMA_FLOOR = 1e-6;
const SCAN_POINTS = 8;

export function createModels(s: Pick<ClassicalSettings, 'chain' | 'nx' | 'ns' | 'solver'>): ModelSet {
  const spec = { chain: s.chain, nx: s.nx, ns: s.ns, options: s.solver };
  const nsCoarse = Math.min(s.ns, 40);
  const nxCoarse = Math.min(s.nx, 32);
  if (nxCoarse === s.nx && nsCoarse === s.ns) {
    const full = new LamellaModel(spec);
    return { full, coarse: full };
  }
  const coarse = new LamellaModel({ chain: s.chain, nx: nxCoarse, ns: nsCoarse, options: { ...s.solver, tolerance: Math.max(s.solver?.tolerance ?? 1e-9, 1e-7) } });
  return { full: new LamellaModel(spec, coarse), coarse };
}

export function defaultChiNRange(chain: ChainSpec): [number, number] {
  const s = spinodal(buildChain(chain)).chiN;
  return [Math.round(1.01 * s * 1000) / 1000, 60];
}

export interface IntervalReport {
  lo: number;
  hi: number;
  probability: number;
  /** Δχ² threshold used (1 and 3.841 with sigma known; t² quantiles with sigma estimated). */
  deltaChi2: number;
  /** An end that reached the search-range bound before the level: the interval is open there. */
  limitedByRange: { lo: boolean; hi: boolean };
}

export interface ClassicalEstimate {
  chiN: number;
  interval: [number, number];
  interval95: [number, number];
  intervals: Record<'68.3%' | '95%', IntervalReport>;
  /** Offset and period in Rg. */
  offset: number;
  period: number;
  periodMode: PeriodMode['mode'];
  chi2: number;
  reducedChi2: number;
  rss: number;
  rmsResidual: number;
  n: number;
  p: number;
  dof: number;
  sigma: { source: 'column' | 'estimated'; value: number | null; floored: boolean };
  chiNRange: [number, number];
  resolution: number;
  seconds: number;
  cost: { chiNEvaluations: number; solves: number; iterations: number; coarseSolves: number; coarseIterations: number };
  profile: { chiN: number; deltaChi2: number; period: number; offset: number }[];
  /** Model at the data positions: blurred (compared with the data) and unblurred; residual = data − fit. */
  fit: Float64Array;
  fitUnblurred: Float64Array;
  residual: Float64Array;
  /** The best-fit solution (fields, densities; in the phase convention, an A-domain centre at x = 0). */
  solution: ScftSolution;
  /** The best-fit φ_A as its band-limited interpolant (unblurred, origin at an A-domain centre). */
  model: FourierSeries;
  notes: string[];
  /** Findings that could mislead a decision (a reduced χ² far above 1 with sigma given). */
  warnings: string[];
}

export function estimateClassical(data: ProfileData, settings: ClassicalSettings, models: ModelSet = createModels(settings)): ClassicalEstimate {
  const t0 = performance.now();
  const periodSource = settings.periodSource ?? '--period';
  const rangeSource = settings.rangeSource ?? '--chiN-range';
  const n = data.x.length;
  const p = settings.period.mode === 'free' ? 3 : 2;
  const unknowns = settings.period.mode === 'free' ? 'χN, the offset and the period' : 'χN and the offset';
  if (n <= p) {
    throw new InputError(`${data.source}: ${n} data point(s), but the fit has ${p} unknowns (${unknowns}) and needs more points than unknowns${data.sigma ? '' : ' to estimate sigma from the residuals'}: give at least ${p + 1} points`);
  }
  const span = data.x[n - 1] - data.x[0];
  const toUser = (v: number) => (data.units.x === 'nm' ? v * data.units.rgNm! : v);
  const unit = data.units.x;
  if (settings.period.mode === 'given' && settings.period.value > 2 * span) {
    throw new InputError(
      `${periodSource}: got ${toUser(settings.period.value)} ${unit}, more than twice the data span ${toUser(span).toPrecision(6)} ${unit}: the profile covers less than half a period, which cannot constrain the fit. Give a longer profile or check the period's units`,
    );
  }
  const fitData: FitData = {
    x: data.x,
    phi: data.phi,
    weight: data.sigma ? data.sigma.map((s) => 1 / (s * s)) : new Float64Array(n).fill(1),
  };
  const range = settings.chiNRange ?? defaultChiNRange(settings.chain);
  let freeBounds;
  if (settings.period.mode === 'free') {
    const spacing = median(Array.from({ length: n - 1 }, (_, i) => data.x[i + 1] - data.x[i]));
    const lo = 4 * spacing;
    const hi = 2 * span;
    if (!(lo < hi)) throw new InputError(`${periodSource}: got "free", but ${n} points over ${toUser(span)} ${unit} cannot fix a period: the period search runs from four sample spacings to twice the data span, and here that range is empty`);
    freeBounds = { lo, hi, start: periodogramPeriod(fitData, lo, hi), flag: periodSource };
  }
  let stage: 'scan' | 'refine' | 'interval' | 'curve' = 'scan';
  const objSettings = { period: settings.period, resolution: settings.resolution, freeBounds, onEvaluation: (e: Evaluation) => settings.onEvaluation?.(stage, e) };
  const search = { range, rangeSource, scanPoints: SCAN_POINTS, relTol: 1e-7 };
  const coarse = models.coarse === models.full ? undefined : new Objective(models.coarse, fitData, objSettings);
  const full = new Objective(models.full, fitData, objSettings);
  const before = { ...models.full.counters };
  const beforeCoarse = { ...models.coarse.counters };

  const guess = scanMinimum((c) => (coarse ?? full).at(c), search, coarse ? 1e-4 : 1e-7);
  stage = 'refine';
  const best = refineMinimum((c) => full.at(c), search, guess, coarse ? 2e-3 : 1e-3);
  const bestEval = full.at(best.chiN);
  if (bestEval.phase !== 'lamellar') throw new InputError(`${data.source}: the best fit is the disordered melt (a flat profile): no lamellar χN can be fitted to these data`);

  const notes: string[] = [];
  const dof = n - p;
  let scale = 1;
  let sigma: ClassicalEstimate['sigma'];
  if (data.sigma) sigma = { source: 'column', value: null, floored: false };
  else {
    let s = Math.sqrt(best.value / dof);
    const floored = s < SIGMA_FLOOR;
    if (floored) {
      s = SIGMA_FLOOR;
      notes.push(`the residuals are at the model's numerical precision (rms ${Math.sqrt(best.value / n).toExponential(2)}); the estimated sigma is floored at ${SIGMA_FLOOR}, so the interval reflects numerical, not measurement, precision`);
    }
    scale = s * s;
    sigma = { source: 'estimated', value: s, floored };
    notes.push(`no sigma column: sigma estimated from the residuals, σ̂² = RSS_min/(n − p) with unit weights; the interval assumes equal, independent Gaussian errors and uses t-distribution levels`);
  }

  stage = 'interval';
  const intervals = {} as ClassicalEstimate['intervals'];
  for (const level of LEVELS) {
    const d = deltaChi2Level(level, !data.sigma, dof);
    const threshold = d * scale;
    const hi = intervalEnd((c) => full.at(c), best, threshold, 1, range, full.evaluations);
    const lo = intervalEnd((c) => full.at(c), best, threshold, -1, range, full.evaluations);
    intervals[level.name] = { lo: lo.chiN, hi: hi.chiN, probability: level.probability, deltaChi2: d, limitedByRange: { lo: lo.limitedByRange, hi: hi.limitedByRange } };
    if (lo.limitedByRange || hi.limitedByRange) notes.push(`the ${level.name} interval reaches the search-range bound (${rangeSource}); it is open on that side`);
  }

  // Extra curve points across the 95 % interval and a margin, for a report to draw.
  stage = 'curve';
  const i95 = intervals['95%'];
  const width = i95.hi - i95.lo;
  for (let k = 0; k < settings.profilePoints; k++) {
    const c = i95.lo - 0.3 * width + ((1.6 * width) * k) / Math.max(1, settings.profilePoints - 1);
    if (c > range[0] && c < range[1]) full.at(c);
  }
  const window: [number, number] = [i95.lo - 0.35 * width, i95.hi + 0.35 * width];
  const profile = full.evaluations
    .filter((e) => e.chiN >= window[0] && e.chiN <= window[1])
    .sort((a, b) => a.chiN - b.chiN)
    .map((e: Evaluation) => ({ chiN: e.chiN, deltaChi2: Math.max(0, (e.value - best.value) / scale), period: e.period, offset: e.x0 }));

  if (bestEval.periodAtBound) {
    const fb = freeBounds!;
    throw new InputError(
      `${periodSource}: got "free", and the best period runs to the bound of its search [${toUser(fb.lo).toPrecision(4)}, ${toUser(fb.hi).toPrecision(4)}] ${unit} ` +
        '(at most twice the data span, at least four sample spacings): the data do not fix the period. Give the period (--period L), use --period equilibrium, or give a profile over more periods',
    );
  }
  if (bestEval.period > 2 * span) {
    throw new InputError(
      `${periodSource}: the fitted ${settings.period.mode} period ${toUser(bestEval.period).toPrecision(6)} ${unit} is more than twice the data span ${toUser(span).toPrecision(6)} ${unit}: the profile covers less than half a period, which cannot constrain the fit`,
    );
  }

  const model = bestEval.point.profile;
  const blurred = model.blurred(settings.resolution);
  const fit = blurred.evaluateShifted(data.x, bestEval.x0, new Float64Array(n));
  const fitUnblurred = model.evaluateShifted(data.x, bestEval.x0, new Float64Array(n));
  const residual = fit.map((v, i) => data.phi[i] - v);
  let rss = 0;
  for (const r of residual) rss += r * r;
  const chi2 = best.value / scale;
  if (!data.sigma) notes.push('χ² and reduced χ² are computed with the estimated sigma, so reduced χ² = 1 by construction (unless floored)');
  const warnings: string[] = [];
  const poorFit = data.sigma ? reducedChi2Warning(chi2 / dof, dof, 'this profile') : undefined;
  if (poorFit) warnings.push(poorFit);
  const cost = {
    chiNEvaluations: full.evaluations.length + (coarse?.evaluations.length ?? 0),
    solves: models.full.counters.solves - before.solves,
    iterations: models.full.counters.iterations - before.iterations,
    coarseSolves: coarse ? models.coarse.counters.solves - beforeCoarse.solves : 0,
    coarseIterations: coarse ? models.coarse.counters.iterations - beforeCoarse.iterations : 0,
  };
  return {
    chiN: best.chiN,
    interval: [intervals['68.3%'].lo, intervals['68.3%'].hi],
    interval95: [i95.lo, i95.hi],
    intervals,
    offset: bestEval.x0,
    period: bestEval.period,
    periodMode: settings.period.mode,
    chi2,
    reducedChi2: chi2 / dof,
    rss,
    rmsResidual: Math.sqrt(rss / n),
    n,
    p,
    dof,
    sigma,
    chiNRange: range,
    resolution: settings.resolution,
    seconds: (performance.now() - t0) / 1000,
    cost,
    profile,
    fit,
    fitUnblurred,
    residual,
    solution: bestEval.point.solution,
    model,
    notes,
    warnings,
  };
}

/** A field on the best-fit grid as a function of the data coordinate (Rg): the model's x = 0 sits at the fitted offset. */
export function fieldInDataFrame(est: ClassicalEstimate, values: Float64Array, x: Float64Array): Float64Array {
  return FourierSeries.fromGrid(values, est.period).evaluateShifted(x, est.offset);
}

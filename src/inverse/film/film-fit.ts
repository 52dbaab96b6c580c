/**
 * Fit the film model to a measured depth profile (φ_A or SLD) or specular reflectivity R(Q):
 * χN, the two wall affinities, the interface width, the depth offset (profiles only) and,
 * when asked, the thickness, by bounded Levenberg–Marquardt (numerics/bounded-least-squares.ts)
 * on χ² = Σ ((model_i − y_i)/σ_i)²; then profile-likelihood intervals for χN and the
 * affinities (each fixed on a grid of trial values while every other parameter is refitted;
 * the interval ends are where the profiled χ² rises by the Δχ² level of confidence.ts, found by
 * the root search of profile-likelihood.ts, whose first trial on each side is the curvature
 * estimate of the distance from the fit's Jacobian).
 *
 * Units: lengths in Rg (the caller converts nm), affinities in kT per chain × Rg, SLD in Å⁻²,
 * Q in Å⁻¹. Without a sigma column the fit uses unit weights and σ̂² = RSS_min/(n − p), with
 * t-distribution levels, as the bulk inversion does (classical.ts).
 * Film solves are warm-started from the nearest solved state (film-model.ts), so a fit
 * costs short field iterations; the best state is re-solved from scratch at the end to check
 * that the fitted layering is the film's lowest-F state there.
 */
import { InputError, RunFailure } from '../../io/errors.js';
import type { FitStatistics } from '../fit-quality.js';
import { boundedLeastSquares } from '../../numerics/bounded-least-squares.js';
import type { StackSlds } from '../../reflectivity/sld-profile.js';
import { deltaChi2Level, LEVELS } from '../confidence.js';
import { intervalEnd, quadraticWidth } from '../profile-likelihood.js';
import type { FilmPoint, FilmState } from './film-model.js';
import { FilmModel } from './film-model.js';
import type { FilmModelSpec } from './film-model.js';
import type { FilmDataKind, Instrument } from './film-measurement.js';
import { predictPhi, predictReflectivity, predictSld } from './film-measurement.js';

export interface FilmData {
  kind: FilmDataKind;
  source: string;
  /** Depth (Rg) for profiles; Q (Å⁻¹) for reflectivity. */
  x: Float64Array;
  /** φ_A, SLD (Å⁻²) or R. */
  y: Float64Array;
  sigma?: Float64Array;
}

export type FilmParamName = 'chiN' | 'bottom' | 'top' | 'width' | 'offset' | 'thickness';
export type FilmParams = Record<FilmParamName, number>;

export interface FilmFitSettings {
  model: FilmModelSpec;
  /** Thickness in Rg, or 'fit' (then thicknessStart is the start). */
  thickness: number | 'fit';
  thicknessStart?: number;
  instrument: Instrument;
  chiNRange: [number, number];
  affinityRange: [number, number];
  /** Starting values; affinities not given are scanned over the four sign pairs. */
  start?: Partial<FilmParams>;
  /** Parameters that get profile-likelihood intervals (default χN and both affinities). */
  intervals?: ('chiN' | 'bottom' | 'top')[];
  /** Names used in error messages. */
  sources?: { thickness?: string; chiNRange?: string };
  /** `counted`: one unit of the stage finished (a start, a fit iteration, a profiled point); else a detail within one. */
  onProgress?: (stage: string, detail: string, counted: boolean) => void;
}

export interface ParamInterval {
  lo: number;
  hi: number;
  probability: number;
  deltaChi2: number;
  limitedByRange: { lo: boolean; hi: boolean };
}

export interface FilmFitResult extends FitStatistics {
  kind: FilmDataKind;
  params: FilmParams;
  fitted: FilmParamName[];
  intervals: Partial<Record<'chiN' | 'bottom' | 'top', Record<'68.3%' | '95%', ParamInterval>>>;
  /** Profiled χ² curves (Δχ² in units of the level scale) of each interval parameter. */
  profiles: Partial<Record<'chiN' | 'bottom' | 'top', { value: number; deltaChi2: number }[]>>;
  /** The model at the data points and the residuals y − model. */
  fit: Float64Array;
  residual: Float64Array;
  point: FilmPoint;
  seconds: { fit: number; intervals: number; total: number };
  cost: { solves: number; failedSolves: number; fullSolves: number; iterations: number; lmIterations: number; solveSeconds: number };
  warnings: string[];
  notes: string[];
}

const INTERVAL_PARAMS = ['chiN', 'bottom', 'top'] as const;

export function fitFilm(data: FilmData, s: FilmFitSettings, model = new FilmModel(s.model)): FilmFitResult {
  const t0 = performance.now();
  const n = data.x.length;
  const thicknessFitted = s.thickness === 'fit';
  const names: FilmParamName[] = ['chiN', 'bottom', 'top', 'width'];
  if (data.kind !== 'reflectivity') names.push('offset');
  if (thicknessFitted) names.push('thickness');
  const p = names.length;
  if (n <= p) throw new InputError(`${data.source}: ${n} data point(s), but the film fit has ${p} unknowns (${names.join(', ')}) and needs more points than unknowns: give at least ${p + 1} points`);
  if (data.kind === 'reflectivity' && !data.sigma) throw new InputError(`${data.source}: no dR column; a reflectivity fit needs the uncertainty of every R (columns Q, R, dR), because R spans decades`);
  const inst = s.instrument;
  if (data.kind !== 'phi' && !inst.slds) throw new InputError(`--sld: missing; a ${data.kind} fit needs the SLDs of A, B, the substrate and the medium`);
  if (data.kind === 'reflectivity' && !(inst.rgNm! > 0)) throw new InputError('--rg-nm: missing; a reflectivity fit needs Rg in nm to turn the film thickness into nm (Q is in Å⁻¹)');
  const H0 = thicknessFitted ? s.thicknessStart : (s.thickness as number);
  if (!(H0! > 0)) throw new InputError(`${s.sources?.thickness ?? '--film'}: a thickness fit needs a starting thickness (--thickness-start)`);
  const H = H0!;
  const xmin = data.x[0];
  const xmax = data.x[n - 1];
  if (data.kind === 'phi' && !thicknessFitted && xmax - xmin > H * (1 + 1e-9)) {
    const len = (v: number) => `${Number(v.toPrecision(6))} Rg${inst.rgNm ? ` (${Number((v * inst.rgNm).toPrecision(6))} nm)` : ''}`;
    throw new InputError(`${s.sources?.thickness ?? '--film'}: the film is ${len(H)} thick, but the φA data span ${len(xmax - xmin)}: a composition profile must lie inside the film (check the thickness and the units of x)`);
  }
  const [chiLo, chiHi] = s.chiNRange;
  const [affLo, affHi] = s.affinityRange;
  const lower: Record<FilmParamName, number> = { chiN: chiLo, bottom: affLo, top: affLo, width: 0, offset: 0, thickness: 0.25 * H };
  const upper: Record<FilmParamName, number> = { chiN: chiHi, bottom: affHi, top: affHi, width: 0.25 * H, offset: 0, thickness: 4 * H };
  if (data.kind === 'phi') {
    lower.offset = xmax - (thicknessFitted ? upper.thickness : H);
    upper.offset = xmin;
    if (thicknessFitted) lower.thickness = Math.max(lower.thickness, xmax - xmin);
  } else if (data.kind === 'sld') {
    lower.offset = xmin - (thicknessFitted ? upper.thickness : H);
    upper.offset = xmax;
  }
  const steps: Record<FilmParamName, number> = { chiN: 1e-3 * Math.max(1, chiLo), bottom: 1e-3, top: 1e-3, width: 1e-3 * H, offset: 1e-3 * H, thickness: 1e-3 * H };
  const weight = data.sigma ? data.sigma.map((v) => 1 / v) : new Float64Array(n).fill(1);
  const stateOf = (q: FilmParams): FilmState => ({ chiN: q.chiN, bottom: q.bottom, top: q.top, thickness: q.thickness });
  const predict = (q: FilmParams): Float64Array | undefined => {
    const pt = model.at(stateOf(q));
    if (!pt) return undefined;
    if (data.kind === 'phi') return predictPhi(pt.cell, pt.solution, q, data.x);
    if (data.kind === 'sld') return predictSld(pt.cell, pt.solution, q, data.x, inst.slds as StackSlds);
    return predictReflectivity(pt.cell, pt.solution, q.width, data.x, { ...inst, slds: inst.slds!, rgNm: inst.rgNm! });
  };
  // A state the followed layering cannot reach counts as excluded: a residual so large that LM
  // rejects the step and a profile-likelihood end falls before it.
  const EXCLUDED = 1e6;
  const residualsOf = (q: FilmParams) => {
    const m = predict(q);
    if (!m) return new Float64Array(n).fill(EXCLUDED);
    return m.map((v, i) => (v - data.y[i]) * weight[i]);
  };
  const cost = (r: Float64Array) => r.reduce((a, v) => a + v * v, 0);

  // Starting point.
  const base: FilmParams = {
    chiN: s.start?.chiN ?? Math.min(chiHi, Math.max(chiLo, 15)),
    bottom: s.start?.bottom ?? 1,
    top: s.start?.top ?? 1,
    width: s.start?.width ?? Math.min(upper.width, 0.1),
    offset: s.start?.offset ?? (data.kind === 'phi' ? xmin - (H - (xmax - xmin)) / 2 : data.kind === 'sld' ? Math.min(upper.offset, Math.max(lower.offset, 0)) : 0),
    thickness: H,
  };
  const signPairs: [number, number][] = [];
  const mag = (v: number | undefined) => Math.abs(v ?? 1) || 1;
  for (const b of s.start?.bottom !== undefined ? [Math.sign(s.start.bottom) || 1] : [1, -1])
    for (const t of s.start?.top !== undefined ? [Math.sign(s.start.top) || 1] : [1, -1]) signPairs.push([b * mag(s.start?.bottom), t * mag(s.start?.top)]);
  // χN values tried from each start, outward from the first (each warm-started from its neighbour).
  const chi0 = Math.min(chiHi, Math.max(chiLo, base.chiN));
  const chiScan = s.start?.chiN !== undefined ? [] : [12, 9, 22, 30].filter((c) => c >= chiLo && c <= chiHi && c !== chi0);
  let start = base;
  let startCost = Infinity;
  let startPoint: FilmPoint | undefined;
  const score = (pt: FilmPoint, q: FilmParams) => {
    const m = data.kind === 'phi' ? predictPhi(pt.cell, pt.solution, q, data.x) : data.kind === 'sld' ? predictSld(pt.cell, pt.solution, q, data.x, inst.slds!) : predictReflectivity(pt.cell, pt.solution, q.width, data.x, { ...inst, slds: inst.slds!, rgNm: inst.rgNm! });
    return cost(m.map((v, i) => (v - data.y[i]) * weight[i]));
  };
  for (const [b, t] of signPairs) {
    // Every layering the film solve reaches for this pair of wall preferences (the data may
    // hold one that is not the lowest in free energy at the starting χN), each carried in χN.
    for (const first of model.layerings({ chiN: chi0, bottom: b, top: t, thickness: H })) {
      let prevUp = first;
      let prevDown = first;
      for (const c of [chi0, ...chiScan.sort((u, v) => Math.abs(u - chi0) - Math.abs(v - chi0))]) {
        const prev = c >= chi0 ? prevUp : prevDown;
        const pt = c === chi0 ? first : model.warmFrom(prev, { chiN: c, bottom: b, top: t, thickness: H });
        if (!pt) continue;
        if (c > chi0) prevUp = pt;
        else if (c < chi0) prevDown = pt;
        const q = { ...base, chiN: c, bottom: b, top: t };
        const v = score(pt, q);
        s.onProgress?.('start', `χN = ${c.toPrecision(4)}, affinities ${b}, ${t}, layers ${pt.layers.sequence}: χ² ${v.toPrecision(5)}`, true);
        if (v < startCost) {
          startCost = v;
          start = q;
          startPoint = pt;
        }
      }
    }
  }
  if (!startPoint) throw new RunFailure('no film solve converged at any starting point of the fit');
  model.restartFrom(startPoint);

  // Inner fits of the profile likelihood stop once χ² moves by less than this fraction of the
  // smallest Δχ² level: the interval ends move by far less than their own precision then.
  let absTol = 0;
  const fitFrom = (from: FilmParams, free: FilmParamName[], stage: string, maxIterations = 40) => {
    const vec = (q: FilmParams) => Float64Array.from(free, (k) => q[k]);
    const unvec = (v: ArrayLike<number>): FilmParams => {
      const q = { ...from };
      free.forEach((k, i) => (q[k] = v[i]));
      return q;
    };
    const r = boundedLeastSquares((v) => residualsOf(unvec(v)), vec(from), {
      lower: free.map((k) => lower[k]),
      upper: free.map((k) => upper[k]),
      steps: free.map((k) => steps[k]),
      maxIterations,
      relTol: 1e-7,
      stepTol: 0.1,
      absTol,
      // The main fit counts its iterations; an interval's inner fits count their finished points (below).
      onIteration: (it) => s.onProgress?.(stage, `iteration ${it.iteration}: χ² ${it.cost.toPrecision(7)}, ${free.map((k, i) => `${k} ${it.p[i].toPrecision(5)}`).join(', ')}`, stage === 'fit'),
    });
    return { params: unvec(r.p), cost: r.cost, iterations: r.iterations, atBound: free.filter((_, i) => r.atBound[i]), jacobian: r.jacobian };
  };

  let lmIterations = 0;
  const best = fitFrom(start, names, 'fit');
  lmIterations += best.iterations;
  const tFit = performance.now();
  const dof = n - p;
  const scale = data.sigma ? 1 : Math.max(best.cost / dof, 1e-300);
  const warnings: string[] = [];
  const notes: string[] = [];
  absTol = 0.01 * scale;

  // Profile-likelihood intervals.
  const intervals: FilmFitResult['intervals'] = {};
  const profiles: FilmFitResult['profiles'] = {};
  for (const name of s.intervals ?? INTERVAL_PARAMS) {
    const others = names.filter((k) => k !== name);
    const known: { chiN: number; value: number; params: FilmParams }[] = [{ chiN: best.params[name], value: best.cost, params: best.params }];
    const fn = (v: number) => {
      const hit = known.find((k) => k.chiN === v);
      if (hit) return hit;
      // Start from the profiled point nearest in this parameter.
      const near = known.reduce((a, k) => (Math.abs(k.chiN - v) < Math.abs(a.chiN - v) ? k : a));
      const r = fitFrom({ ...near.params, [name]: v }, others, `interval ${name}`, 20);
      lmIterations += r.iterations;
      const pt = { chiN: v, value: r.cost, params: r.params };
      known.push(pt);
      s.onProgress?.(`interval ${name}`, `${name} = ${v.toPrecision(6)}: Δχ² ${((r.cost - best.cost) / scale).toPrecision(4)}`, true);
      return pt;
    };
    const range: [number, number] = [lower[name], upper[name]];
    const out = {} as Record<'68.3%' | '95%', ParamInterval>;
    for (const level of LEVELS) {
      const d = deltaChi2Level(level, !data.sigma, dof);
      const bestPt = { chiN: best.params[name], value: best.cost };
      // The first trial on each side at the curvature estimate of the distance to the level.
      const width = quadraticWidth(best.jacobian, names.indexOf(name), d * scale);
      const hi = intervalEnd(fn, bestPt, d * scale, 1, range, known, { width });
      const lo = intervalEnd(fn, bestPt, d * scale, -1, range, known, { width });
      out[level.name] = { lo: lo.chiN, hi: hi.chiN, probability: level.probability, deltaChi2: d, limitedByRange: { lo: lo.limitedByRange, hi: hi.limitedByRange } };
      if (lo.limitedByRange || hi.limitedByRange) notes.push(`the ${level.name} interval of ${name} reaches the search bound [${range[0]}, ${range[1]}]: it is open on that side`);
    }
    intervals[name] = out;
    profiles[name] = known.filter((k) => k.value < 0.5 * n * EXCLUDED * EXCLUDED).map((k) => ({ value: k.chiN, deltaChi2: Math.max(0, (k.value - best.cost) / scale) })).sort((a, b) => a.value - b.value);
  }
  const tIntervals = performance.now();

  const point = model.at(stateOf(best.params));
  if (!point || !point.solution.converged) throw new RunFailure(`the film solve at the best fit did not converge (χN = ${best.params.chiN}, residual ${point?.solution.residual ?? 'none: no converged state'})`);
  const fit = predict(best.params)!;
  if (model.counters.failed > 0) notes.push(`${model.counters.failed} trial state(s) could not be reached from the fitted layering (the warm-started solve did not converge): they count as excluded, so an interval may end where that layering stops existing`);
  const residual = fit.map((v, i) => data.y[i] - v);
  const chi2 = best.cost / scale;
  if (data.sigma && chi2 / dof > 2) warnings.push(`reduced χ² is ${(chi2 / dof).toPrecision(3)} (> 2): the model misses the data by more than their stated errors, so the intervals (which assume the model is right) are too narrow; check the SLDs, the thickness, the resolution, or whether the film is laterally uniform`);
  if (!data.sigma) notes.push('no sigma column: sigma estimated from the residuals, σ̂² = RSS_min/(n − p) with unit weights; the intervals use t-distribution levels and χ²/dof = 1 by construction');
  for (const k of best.atBound) warnings.push(`${k} ends on its bound (${lower[k]} … ${upper[k]}): the fit is limited there; widen the range if that is not physical`);
  // The warm-started fit follows the layering it started in: check it is the lowest-F state.
  const fresh = model.confirm(stateOf(best.params));
  if (fresh.layers.sequence !== point.layers.sequence && fresh.solution.freeEnergy < point.solution.freeEnergy - 1e-6) {
    warnings.push(`the fitted film state (layers ${point.layers.sequence}, F ${point.solution.freeEnergy.toFixed(5)} kT per chain) is not the lowest free energy at the fitted parameters (layers ${fresh.layers.sequence}, F ${fresh.solution.freeEnergy.toFixed(5)}): the data are fitted by a metastable layering`);
  }
  const t1 = performance.now();
  return {
    kind: data.kind,
    params: best.params,
    fitted: names,
    intervals,
    profiles,
    chi2,
    reducedChi2: chi2 / dof,
    n,
    p,
    dof,
    sigma: data.sigma ? { source: 'column', value: null } : { source: 'estimated', value: Math.sqrt(scale) },
    fit,
    residual,
    point,
    seconds: { fit: (tFit - t0) / 1000, intervals: (tIntervals - tFit) / 1000, total: (t1 - t0) / 1000 },
    cost: { solves: model.counters.solves, failedSolves: model.counters.failed, fullSolves: model.counters.fullSolves, iterations: model.counters.iterations, lmIterations, solveSeconds: model.counters.seconds },
    warnings,
    notes,
  };
}

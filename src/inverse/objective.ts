/**
 * The profiled misfit at a trial χN: the best phase offset (and, with a free period, the
 * best period) for the model lamella at that χN, against the data.
 *
 *   equilibrium: the lamella at its stress-free period L_eq(χN)
 *   given:       the lamella at the period given by the user
 *   free:        min over L of the misfit, by Brent's method warm-started from the best L of
 *                the nearest χN already evaluated (or from the data's own periodicity)
 */
import { bracketMinimum, brentMinimize } from '../numerics/brent-minimize.js';
import { solveDense } from '../numerics/dense-solve.js';
import type { LamellaModel, ModelPoint } from './lamella-model.js';
import type { FitData } from './offset-fit.js';
import { fitOffset } from './offset-fit.js';

export type PeriodMode = { mode: 'equilibrium' } | { mode: 'given'; value: number } | { mode: 'free' };

export interface Evaluation {
  chiN: number;
  /** Profiled misfit: χ² with a sigma column, else the residual sum of squares. */
  value: number;
  x0: number;
  /** Period in Rg (NaN for a disordered model in equilibrium mode). */
  period: number;
  phase: 'lamellar' | 'disordered';
  point: ModelPoint;
  /** Free period only: the period search ran to a bound at this χN. */
  periodAtBound?: boolean;
}

export interface ObjectiveSettings {
  period: PeriodMode;
  /** Gaussian resolution (standard deviation) in Rg; 0 for none. */
  resolution: number;
  /** Free period: the search bounds in Rg and a starting period from the data. */
  freeBounds?: { lo: number; hi: number; start: number; flag: string };
  /** Called after each new χN evaluation (progress reporting). */
  onEvaluation?: (e: Evaluation) => void;
}

export class Objective {
  readonly evaluations: Evaluation[] = [];
  private readonly memo = new Map<number, Evaluation>();

  constructor(
    readonly model: LamellaModel,
    readonly data: FitData,
    readonly settings: ObjectiveSettings,
  ) {}

  private scoreAt(point: ModelPoint): { value: number; x0: number } {
    const prof = point.profile.blurred(this.settings.resolution);
    return fitOffset(prof, this.data);
  }

  at(chiN: number): Evaluation {
    const hit = this.memo.get(chiN);
    if (hit) return hit;
    const s = this.settings.period;
    let ev: Evaluation;
    if (s.mode === 'equilibrium') {
      const point = this.model.equilibrium(chiN);
      ev = { chiN, ...this.scoreAt(point), period: point.period, phase: point.phase, point };
    } else if (s.mode === 'given') {
      const point = this.model.at(chiN, s.value);
      ev = { chiN, ...this.scoreAt(point), period: s.value, phase: point.phase, point };
    } else ev = this.freePeriod(chiN);
    this.memo.set(chiN, ev);
    this.evaluations.push(ev);
    this.settings.onEvaluation?.(ev);
    return ev;
  }

  private startPeriod(chiN: number): number {
    let best: Evaluation | undefined;
    for (const e of this.evaluations) {
      if (e.phase !== 'lamellar') continue;
      if (!best || Math.abs(Math.log(e.chiN / chiN)) < Math.abs(Math.log(best.chiN / chiN))) best = e;
    }
    return best ? best.period : this.settings.freeBounds!.start;
  }

  private freePeriod(chiN: number): Evaluation {
    const b = this.settings.freeBounds!;
    const scored = new Map<number, { value: number; x0: number; point: ModelPoint }>();
    const score = (L: number) => {
      let r = scored.get(L);
      if (!r) {
        const point = this.model.at(chiN, L);
        r = { ...this.scoreAt(point), point };
        scored.set(L, r);
      }
      return r;
    };
    const L0 = Math.min(b.hi, Math.max(b.lo, this.startPeriod(chiN)));
    const first = score(L0);
    if (first.point.phase === 'disordered') return { chiN, value: first.value, x0: first.x0, period: Number.NaN, phase: 'disordered', point: first.point };
    let bracket;
    try {
      bracket = bracketMinimum((L) => score(L).value, L0, Math.min(b.hi, L0 * 1.004), b.lo, b.hi);
    } catch {
      // The misfit still falls at a bound of the period search: profile this χN at that bound and
      // flag it; only a best fit that ends there is an error (classical.ts).
      const atLo = score(b.lo);
      const atHi = score(b.hi);
      const [L, r] = atLo.value < atHi.value ? [b.lo, atLo] : [b.hi, atHi];
      return { chiN, value: r.value, x0: r.x0, period: L, phase: r.point.phase, point: r.point, periodAtBound: true };
    }
    // χ² is quadratic in L at its minimum, so a relative error of 1e-6 in L changes it negligibly.
    const best = brentMinimize((L) => score(L).value, bracket, 1e-6);
    const r = score(best.x);
    return { chiN, value: r.value, x0: r.x0, period: best.x, phase: r.point.phase, point: r.point };
  }
}

/**
 * The data's own period: the best single-sinusoid least-squares fit a + b cos(2πx/L) +
 * c sin(2πx/L) over a geometric scan of L in [lo, hi] (a periodogram). A start for the free
 * period and the unit check's period only; the model fit refines it.
 *
 * A long, evenly spaced profile (100 000 rows) spent most of an inversion here: two cosines
 * and sines per point and trial period. There every trial period is first scored with cos and
 * sin carried along the grid by the angle-addition recurrence (exact values every
 * RESYNC points), and only the SCREENED best are fitted again exactly; the answer is the best
 * of those exact fits, as the full exact scan gives unless more than SCREENED trial periods
 * score within the recurrence's rounding of the best. Other profiles are scanned exactly.
 */
export function periodogramPeriod(data: FitData, lo: number, hi: number, points = 400): number {
  const n = data.x.length;
  const trial = (k: number) => lo * Math.pow(hi / lo, k / (points - 1));
  const cw = new Float64Array(n);
  const sw = new Float64Array(n);
  const exactRss = (L: number) => {
    const w = (2 * Math.PI) / L;
    for (let i = 0; i < n; i++) {
      cw[i] = Math.cos(w * data.x[i]);
      sw[i] = Math.sin(w * data.x[i]);
    }
    return sinusoidRss(data, cw, sw);
  };
  let candidates = Array.from({ length: points }, (_, k) => k);
  const spacing = n > 1 ? (data.x[n - 1] - data.x[0]) / (n - 1) : 0;
  if (n >= SCREEN_FROM && evenlySpaced(data.x, spacing)) {
    const screened = candidates.map((k) => ({ k, rss: screenedRss(data, (2 * Math.PI) / trial(k), spacing, cw, sw) }));
    screened.sort((p, q) => p.rss - q.rss || p.k - q.k);
    candidates = screened
      .slice(0, SCREENED)
      .map((c) => c.k)
      .sort((p, q) => p - q);
  }
  let best = lo;
  let bestRss = Infinity;
  for (const k of candidates) {
    const L = trial(k);
    const rss = exactRss(L);
    if (rss < bestRss) {
      bestRss = rss;
      best = L;
    }
  }
  return best;
}

/** Profiles at least this long are screened (below, the exact scan is cheap). */
const SCREEN_FROM = 4096;
/** Trial periods fitted exactly after the screen. */
const SCREENED = 8;
/** Points between exact cos/sin values in the screen's recurrence (its rounding grows ~linearly in between). */
const RESYNC = 64;

/** Evenly spaced to 1e-3 of the spacing: the screen's recurrence steps by the mean spacing. */
function evenlySpaced(x: ArrayLike<number>, spacing: number): boolean {
  if (!(spacing > 0)) return false;
  for (let i = 0; i < x.length; i++) if (Math.abs(x[i] - (x[0] + i * spacing)) > 1e-3 * spacing) return false;
  return true;
}

/** The weighted rss of the least-squares sinusoid with cos/sin columns cw, sw (Infinity when singular). */
function sinusoidRss(data: FitData, cw: Float64Array, sw: Float64Array): number {
  const n = data.x.length;
  // The normal equations of columns (1, cos, sin), summed inline (the general least-squares
  // routine's per-row callback was most of a long profile's time), in its order of operations.
  let a00 = 0, a01 = 0, a02 = 0, a11 = 0, a12 = 0, a22 = 0, b0 = 0, b1 = 0, b2 = 0;
  for (let i = 0; i < n; i++) {
    const wi = data.weight[i];
    const c = cw[i];
    const s = sw[i];
    const y = data.phi[i];
    b0 += wi * 1 * y;
    a00 += wi * 1 * 1;
    a01 += wi * 1 * c;
    a02 += wi * 1 * s;
    b1 += wi * c * y;
    a11 += wi * c * c;
    a12 += wi * c * s;
    b2 += wi * s * y;
    a22 += wi * s * s;
  }
  const coef = solveDense(
    [Float64Array.of(a00, a01, a02), Float64Array.of(a01, a11, a12), Float64Array.of(a02, a12, a22)],
    Float64Array.of(b0, b1, b2),
  );
  if (!coef) return Infinity;
  let rss = 0;
  for (let i = 0; i < n; i++) {
    const r = coef[0] + coef[1] * cw[i] + coef[2] * sw[i] - data.phi[i];
    rss += data.weight[i] * r * r;
  }
  return rss;
}

/** sinusoidRss at angular frequency w with cos/sin by the recurrence on an even grid (the screen). */
function screenedRss(data: FitData, w: number, spacing: number, cw: Float64Array, sw: Float64Array): number {
  const n = data.x.length;
  const c1 = Math.cos(w * spacing);
  const s1 = Math.sin(w * spacing);
  for (let i = 0; i < n; i++) {
    if (i % RESYNC === 0) {
      cw[i] = Math.cos(w * data.x[i]);
      sw[i] = Math.sin(w * data.x[i]);
    } else {
      cw[i] = cw[i - 1] * c1 - sw[i - 1] * s1;
      sw[i] = sw[i - 1] * c1 + cw[i - 1] * s1;
    }
  }
  return sinusoidRss(data, cw, sw);
}

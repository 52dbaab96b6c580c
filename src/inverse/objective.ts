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
import { linearLeastSquares } from '../numerics/dense-solve.js';
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
 * period only; the model fit refines it.
 */
export function periodogramPeriod(data: FitData, lo: number, hi: number, points = 400): number {
  let best = lo;
  let bestRss = Infinity;
  const n = data.x.length;
  // cos and sin of each point, computed once per trial period and used by both passes (a long profile spends its time here).
  const cw = new Float64Array(n);
  const sw = new Float64Array(n);
  for (let k = 0; k < points; k++) {
    const L = lo * Math.pow(hi / lo, k / (points - 1));
    const w = (2 * Math.PI) / L;
    const [coef] = linearLeastSquares(
      n,
      3,
      (i, out) => {
        cw[i] = Math.cos(w * data.x[i]);
        sw[i] = Math.sin(w * data.x[i]);
        out[0] = 1;
        out[1] = cw[i];
        out[2] = sw[i];
      },
      [data.phi],
      data.weight,
    );
    if (!coef) continue;
    let rss = 0;
    for (let i = 0; i < n; i++) {
      const r = coef[0] + coef[1] * cw[i] + coef[2] * sw[i] - data.phi[i];
      rss += data.weight[i] * r * r;
    }
    if (rss < bestRss) {
      bestRss = rss;
      best = L;
    }
  }
  return best;
}

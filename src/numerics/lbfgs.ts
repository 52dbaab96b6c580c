/**
 * Limited-memory BFGS minimisation of a smooth f: R^n → R, in float64, pure JS (the
 * quasi-Newton polish after Adam; the caller's callback may evaluate a tfjs loss).
 *
 * Sources (Nocedal & Wright, "Numerical Optimization", 2nd ed., Springer 2006):
 *   - search direction by the L-BFGS two-loop recursion, Algorithm 7.4, with the initial
 *     matrix H0 = γ I, γ = sᵀy / yᵀy of the newest pair (eq. 7.20);
 *   - outer iteration Algorithm 7.5, pairs kept only when sᵀy > 0 (curvature condition,
 *     which keeps H positive definite);
 *   - step length by the line search of Algorithm 3.5 with zoom (Algorithm 3.6), which
 *     returns a step satisfying the strong Wolfe conditions (eq. 3.7)
 *         f(x + αd) ≤ f(x) + c1 α ∇fᵀd,    |∇f(x + αd)ᵀd| ≤ c2 |∇fᵀd|,
 *     c1 = 1e-4, c2 = 0.9 (values recommended for quasi-Newton methods, §3.1), trial
 *     steps inside a bracket by cubic interpolation (eq. 3.59), safeguarded.
 *
 * Units: whatever the caller's f and x carry. Gradient tolerance is on max_i |g_i|.
 *
 * Written as a generator (numerics/stepwise.ts): `lbfgs` runs it to the end, `lbfgsYielding`
 * lets events (a Ctrl-C) run between iterations and stops with reason 'interrupted'.
 */
import { runToEnd, runYielding } from './stepwise.js';
import type { Stepwise } from './stepwise.js';

export interface LbfgsOptions {
  maxIterations?: number;
  /** Number m of curvature pairs kept. */
  history?: number;
  /** Stop when max |g_i| ≤ this. */
  gradientTolerance?: number;
  /** Stop when |f_k − f_{k+1}| ≤ functionTolerance · max(|f_k|, |f_{k+1}|, 1). 0 disables. */
  functionTolerance?: number;
  /** Budget of callback evaluations over the whole run. */
  maxEvaluations?: number;
  /** Trial steps per line search. */
  maxLineSearch?: number;
  c1?: number;
  c2?: number;
  /** Called after every iteration; return false to stop. */
  onIteration?: (it: LbfgsIteration, x: Float64Array) => boolean | void;
}

export type LbfgsStop =
  | 'gradient' // max |g| ≤ gradientTolerance
  | 'function' // relative decrease of f below functionTolerance
  | 'maxIterations'
  | 'maxEvaluations'
  | 'lineSearch' // no step satisfying the Wolfe conditions (often: f is noisy at this scale)
  | 'nonFinite' // f or g not finite at the start point
  | 'callback'
  | 'interrupted'; // the driver was asked to stop (lbfgsYielding's shouldStop)

export interface LbfgsIteration {
  iteration: number;
  /** f and max |g| after the step. */
  f: number;
  gradMax: number;
  /** Accepted step length α along d, f before the step and the slopes ∇fᵀd before and after. */
  step: number;
  fBefore: number;
  slopeBefore: number;
  slopeAfter: number;
  /** Callback evaluations so far. */
  evaluations: number;
  /** True when the step met only the sufficient-decrease condition (line search gave up). */
  weakStep: boolean;
}

export interface LbfgsResult {
  x: Float64Array;
  f: number;
  g: Float64Array;
  iterations: number;
  evaluations: number;
  reason: LbfgsStop;
  trajectory: LbfgsIteration[];
}

export type Objective = (x: Float64Array) => { f: number; g: ArrayLike<number> };

function dot(a: Float64Array, b: Float64Array): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i] * b[i];
  return s;
}

function maxAbs(a: Float64Array): number {
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i]));
  return m;
}

function allFinite(a: Float64Array): boolean {
  for (let i = 0; i < a.length; i++) if (!Number.isFinite(a[i])) return false;
  return true;
}

interface Point {
  alpha: number;
  x: Float64Array;
  f: number;
  g: Float64Array;
  slope: number;
}

/**
 * Minimiser of the cubic interpolating φ and φ' at a and b (N&W eq. 3.59), or NaN when
 * the cubic has no real minimiser.
 */
export function cubicMinimizer(a: number, fa: number, da: number, b: number, fb: number, db: number): number {
  const d1 = da + db - (3 * (fa - fb)) / (a - b);
  const disc = d1 * d1 - da * db;
  if (!(disc >= 0)) return NaN;
  const d2 = Math.sign(b - a) * Math.sqrt(disc);
  const den = db - da + 2 * d2;
  if (den === 0) return NaN;
  return b - ((b - a) * (db + d2 - d1)) / den;
}

/**
 * The L-BFGS search direction d = −H_k g by the two-loop recursion (N&W Alg. 7.4), pairs
 * (s_i, y_i) oldest first, ρ_i = 1/(y_iᵀ s_i), H0 = γ I with γ = sᵀy/yᵀy of the newest
 * pair (N&W eq. 7.20; γ = 1 without pairs).
 */
export function twoLoopDirection(g: Float64Array, S: Float64Array[], Y: Float64Array[], rho: number[]): Float64Array {
  const n = g.length;
  const k = S.length;
  const alpha = new Float64Array(k);
  const q = Float64Array.from(g);
  for (let i = k - 1; i >= 0; i--) {
    const a = rho[i] * dot(S[i], q);
    alpha[i] = a;
    const yi = Y[i];
    for (let j = 0; j < n; j++) q[j] -= a * yi[j];
  }
  const gamma = k > 0 ? dot(S[k - 1], Y[k - 1]) / dot(Y[k - 1], Y[k - 1]) : 1;
  for (let j = 0; j < n; j++) q[j] *= gamma;
  for (let i = 0; i < k; i++) {
    const c = alpha[i] - rho[i] * dot(Y[i], q);
    const si = S[i];
    for (let j = 0; j < n; j++) q[j] += c * si[j];
  }
  for (let j = 0; j < n; j++) q[j] = -q[j];
  return q;
}

export function lbfgs(fg: Objective, x0: ArrayLike<number>, options: LbfgsOptions = {}): LbfgsResult {
  return runToEnd(lbfgsSteps(fg, x0, options));
}

/** lbfgs with one event-loop pause after every iteration; `shouldStop()` true ends it with reason 'interrupted'. */
export function lbfgsYielding(fg: Objective, x0: ArrayLike<number>, options: LbfgsOptions, pause: () => Promise<void>, shouldStop: () => boolean): Promise<LbfgsResult> {
  return runYielding(lbfgsSteps(fg, x0, options), pause, shouldStop);
}

/** The iterations of lbfgs, one yield after each (the answer false stops it). */
export function* lbfgsSteps(fg: Objective, x0: ArrayLike<number>, options: LbfgsOptions = {}): Stepwise<LbfgsIteration, LbfgsResult> {
  const n = x0.length;
  const maxIterations = options.maxIterations ?? 200;
  const m = options.history ?? 10;
  const gtol = options.gradientTolerance ?? 1e-6;
  const ftol = options.functionTolerance ?? 0;
  const maxEvaluations = options.maxEvaluations ?? Infinity;
  const maxLs = options.maxLineSearch ?? 25;
  const c1 = options.c1 ?? 1e-4;
  const c2 = options.c2 ?? 0.9;
  if (!(0 < c1 && c1 < c2 && c2 < 1)) throw new RangeError(`need 0 < c1 < c2 < 1 (N&W §3.1), got c1 = ${c1}, c2 = ${c2}`);

  let evaluations = 0;
  const evaluate = (x: Float64Array): { f: number; g: Float64Array } => {
    evaluations++;
    const r = fg(x);
    const g = Float64Array.from(r.g);
    if (g.length !== n) throw new RangeError(`gradient has ${g.length} entries, x has ${n}`);
    return { f: r.f, g };
  };

  let x: Float64Array = Float64Array.from(x0);
  let { f, g } = evaluate(x);
  const trajectory: LbfgsIteration[] = [];
  const done = (reason: LbfgsStop, iterations: number): LbfgsResult => ({ x, f, g, iterations, evaluations, reason, trajectory });
  if (!Number.isFinite(f) || !allFinite(g)) return done('nonFinite', 0);
  if (maxAbs(g) <= gtol) return done('gradient', 0);

  const S: Float64Array[] = [];
  const Y: Float64Array[] = [];
  const rho: number[] = [];

  const direction = (): Float64Array => twoLoopDirection(g, S, Y, rho);

  for (let iter = 1; iter <= maxIterations; iter++) {
    let d = direction();
    let slope0 = dot(g, d);
    if (!(slope0 < 0)) {
      // Not a descent direction (rounding in the pairs): restart from steepest descent.
      S.length = Y.length = rho.length = 0;
      d = g.map((v) => -v);
      slope0 = dot(g, d);
    }
    // First iteration (no curvature information): a step of unit length in x (common practice, no source).
    const alpha0 = S.length === 0 ? Math.min(1, 1 / Math.sqrt(-slope0)) : 1;

    const at = (alpha: number): Point => {
      const xt = new Float64Array(n);
      for (let j = 0; j < n; j++) xt[j] = x[j] + alpha * d[j];
      const r = evaluate(xt);
      const fv = Number.isFinite(r.f) && allFinite(r.g) ? r.f : Infinity;
      return { alpha, x: xt, f: fv, g: r.g, slope: fv === Infinity ? NaN : dot(r.g, d) };
    };
    const armijo = (p: Point) => p.f <= f + c1 * p.alpha * slope0;
    const curvature = (p: Point) => Math.abs(p.slope) <= -c2 * slope0;

    const start: Point = { alpha: 0, x, f, g, slope: slope0 };
    let accepted: Point | null = null;
    let weak = false;
    let trials = 0;
    let budget = false;

    /** N&W Alg. 3.6: lo satisfies Armijo and has the lowest f so far; the bracket [lo, hi] holds a Wolfe step. */
    const zoom = (lo: Point, hi: Point): Point | null => {
      while (trials < maxLs) {
        if (evaluations >= maxEvaluations) {
          budget = true;
          break;
        }
        const width = hi.alpha - lo.alpha;
        let a = Number.isFinite(hi.f) && Number.isFinite(hi.slope) ? cubicMinimizer(lo.alpha, lo.f, lo.slope, hi.alpha, hi.f, hi.slope) : NaN;
        // Safeguard: stay 10% inside the bracket, else bisect (common practice, no source).
        const lower = Math.min(lo.alpha, hi.alpha) + 0.1 * Math.abs(width);
        const upper = Math.max(lo.alpha, hi.alpha) - 0.1 * Math.abs(width);
        if (!(a >= lower && a <= upper)) a = lo.alpha + 0.5 * width;
        if (Math.abs(width) <= 1e-16 * Math.max(1, Math.abs(lo.alpha))) break;
        trials++;
        const p = at(a);
        if (!armijo(p) || p.f >= lo.f) {
          hi = p;
        } else {
          if (curvature(p)) return p;
          if (p.slope * (hi.alpha - lo.alpha) >= 0) hi = lo;
          lo = p;
        }
      }
      // No strong-Wolfe step found: keep the best Armijo point if it moved (noisy f in float32).
      if (lo.alpha > 0) {
        weak = true;
        return lo;
      }
      return null;
    };

    // N&W Alg. 3.5.
    let prev = start;
    let alpha = alpha0;
    while (trials < maxLs) {
      if (evaluations >= maxEvaluations) {
        budget = true;
        break;
      }
      trials++;
      const p = at(alpha);
      if (!armijo(p) || (prev.alpha > 0 && p.f >= prev.f)) {
        accepted = zoom(prev, p);
        break;
      }
      if (curvature(p)) {
        accepted = p;
        break;
      }
      if (p.slope >= 0) {
        accepted = zoom(p, prev);
        break;
      }
      prev = p;
      alpha *= 2;
    }
    if (!accepted && !budget && prev.alpha > 0) {
      // Ran out of trials while still extrapolating: prev met Armijo, take it.
      accepted = prev;
      weak = true;
    }
    if (!accepted) return done(budget ? 'maxEvaluations' : 'lineSearch', iter - 1);

    const s = new Float64Array(n);
    const y = new Float64Array(n);
    for (let j = 0; j < n; j++) {
      s[j] = accepted.x[j] - x[j];
      y[j] = accepted.g[j] - g[j];
    }
    const sy = dot(s, y);
    if (sy > 1e-12 * Math.sqrt(dot(s, s) * dot(y, y))) {
      if (S.length === m) {
        S.shift();
        Y.shift();
        rho.shift();
      }
      S.push(s);
      Y.push(y);
      rho.push(1 / sy);
    }
    const fBefore = f;
    x = accepted.x;
    f = accepted.f;
    g = accepted.g;
    const info: LbfgsIteration = {
      iteration: iter,
      f,
      gradMax: maxAbs(g),
      step: accepted.alpha,
      fBefore,
      slopeBefore: slope0,
      slopeAfter: accepted.slope,
      evaluations,
      weakStep: weak,
    };
    trajectory.push(info);
    if (options.onIteration && options.onIteration(info, x) === false) return done('callback', iter);
    if (info.gradMax <= gtol) return done('gradient', iter);
    if (ftol > 0 && Math.abs(fBefore - f) <= ftol * Math.max(Math.abs(fBefore), Math.abs(f), 1)) return done('function', iter);
    if (evaluations >= maxEvaluations) return done('maxEvaluations', iter);
    if (iter < maxIterations && (yield info) === false) return done('interrupted', iter);
  }
  return done('maxIterations', maxIterations);
}

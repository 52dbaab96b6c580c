/**
 * The profile likelihood of χN: the minimum of the profiled misfit P(χN) over a search
 * range, and the χN where P − P_min crosses a Δχ² level on either side.
 *
 * Minimum: a geometric scan of the range (on a cheap model when one is given), Brent's
 * method on the best scan cell, then on the full model a bracket around that estimate and
 * Brent again. Interval ends: root finding (Brent's zeroin) on
 *   s(χN) = sqrt(P(χN) − P_min) − sqrt(level·scale),
 * which is nearly linear in χN where P is nearly quadratic, so each end takes a few
 * evaluations once bracketed; brackets come from points already evaluated, or from a
 * quadratic extrapolation of the nearest one, widened until the level is crossed.
 * When the caller knows the fit's Jacobian, the first trial is placed by the quadratic
 * (Gauss–Newton) estimate of the distance to the level, √(level·[(JᵀJ)⁻¹]_kk) (the projected
 * Δχ² of one parameter with the others refitted: Press et al., Numerical Recipes, 3rd ed.,
 * §15.6), instead of a step of 10⁻³ of |value| that grows by at most 4× per trial: a
 * parameter whose profile is flat (a saturated wall affinity) then reaches its level, or its
 * search bound, in a few trials instead of a dozen. Either way the end is the same root of
 * s, found by the same Brent search.
 */
import { InputError } from '../io/errors.js';
import { bracketMinimum, brentMinimize } from '../numerics/brent-minimize.js';
import { brentRoot } from '../numerics/brent-root.js';
import { solveDense } from '../numerics/dense-solve.js';

export interface ProfiledPoint {
  chiN: number;
  value: number;
}

export type ProfileFn = (chiN: number) => ProfiledPoint;

export interface MinimumSearch {
  range: [number, number];
  /** Flag or config field that set the range (named in errors). */
  rangeSource: string;
  scanPoints: number;
  relTol: number;
}

/** Scan + Brent; returns the χN of the minimum. Throws an InputError if it lies on the range bound. */
export function scanMinimum(fn: ProfileFn, s: MinimumSearch, scanRelTol: number): number {
  const [lo, hi] = s.range;
  const k = Math.max(3, s.scanPoints);
  const grid: number[] = [];
  // From the top down: strongly ordered lamellae first, so every warm start is ordered.
  for (let i = 0; i < k; i++) grid.push(hi * Math.pow(lo / hi, i / (k - 1)));
  const vals = grid.map((c) => fn(c).value);
  let b = 0;
  for (let i = 1; i < k; i++) if (vals[i] < vals[b]) b = i;
  if (b === 0 || b === k - 1) {
    // The best scan point is a bound: the minimum may still lie inside the end cell
    // (near the ODT the profile changes fast with χN). Subdivide that cell before giving up.
    const inner = b === 0 ? 1 : k - 2;
    const sub = [0, 0.25, 0.5, 0.75].map((t) => grid[b] * Math.pow(grid[inner] / grid[b], t));
    const subVals = [vals[b], ...sub.slice(1).map((c) => fn(c).value)];
    sub.push(grid[inner]);
    subVals.push(vals[inner]);
    let j = 0;
    for (let i = 1; i < sub.length; i++) if (subVals[i] < subVals[j]) j = i;
    if (j === 0) {
      // Still the bound: a probe just inside tells a minimum at the bound from one close to it.
      const probe = grid[b] * Math.pow(sub[1] / grid[b], 1e-3);
      const vp = fn(probe).value;
      if (!(vp < subVals[0])) throw boundError(s, b === 0 ? 'upper' : 'lower', grid[b]);
      return brentMinimize((c) => fn(c).value, { a: grid[b], b: probe, c: sub[1], fb: vp }, scanRelTol).x;
    }
    return brentMinimize((c) => fn(c).value, { a: sub[j - 1], b: sub[j], c: sub[j + 1], fb: subVals[j] }, scanRelTol).x;
  }
  return brentMinimize((c) => fn(c).value, { a: grid[b - 1], b: grid[b], c: grid[b + 1], fb: vals[b] }, scanRelTol).x;
}

function boundError(s: MinimumSearch, which: 'lower' | 'upper', at: number): InputError {
  const hint =
    which === 'lower'
      ? 'near the lower bound the lamella is weak and the melt disorders below the ODT: a profile this weak may be disordered or fluctuation-dominated, or f may be wrong'
      : 'widen the range (and raise nx so the grid resolves the narrower interfaces)';
  return new InputError(`${s.rangeSource}: the best fit runs to the ${which} bound χN = ${at.toPrecision(6)} of the search range [${s.range[0]}, ${s.range[1]}]; ${hint}`);
}

/** Bracket a minimum on the full model starting from a guess, then Brent to relTol. */
export function refineMinimum(fn: ProfileFn, s: MinimumSearch, guess: number, step: number): ProfiledPoint {
  const [lo, hi] = s.range;
  const g = Math.min(hi, Math.max(lo, guess));
  let br;
  try {
    br = bracketMinimum((c) => fn(c).value, g, Math.min(hi, g * (1 + step)) === g ? g * (1 - step) : Math.min(hi, g * (1 + step)), lo, hi);
  } catch {
    const v = fn(lo).value < fn(hi).value ? 'lower' : 'upper';
    throw boundError(s, v, v === 'lower' ? lo : hi);
  }
  const r = brentMinimize((c) => fn(c).value, br, s.relTol);
  const limit = 10 * s.relTol;
  if (Math.abs(r.x / lo - 1) < limit) throw boundError(s, 'lower', lo);
  if (Math.abs(r.x / hi - 1) < limit) throw boundError(s, 'upper', hi);
  return fn(r.x);
}

export interface IntervalEnd {
  chiN: number;
  /** True when the level is not crossed before the search-range bound: the end is the bound. */
  limitedByRange: boolean;
  evaluations: number;
}

/**
 * The quadratic estimate of the distance from the best fit to where the profiled sum of squares
 * of parameter k has risen by `threshold`: √(threshold·[(JᵀJ)⁻¹]_kk), with J the Jacobian of the
 * (σ-weighted) residuals at the best fit, given by columns. Undefined when JᵀJ is singular.
 */
export function quadraticWidth(columns: ArrayLike<number>[], k: number, threshold: number): number | undefined {
  const p = columns.length;
  const A = Array.from({ length: p }, () => new Float64Array(p));
  for (let a = 0; a < p; a++)
    for (let b = a; b < p; b++) {
      let v = 0;
      const ca = columns[a];
      const cb = columns[b];
      for (let i = 0; i < ca.length; i++) v += ca[i] * cb[i];
      A[a][b] = v;
      A[b][a] = v;
    }
  const e = new Float64Array(p);
  e[k] = 1;
  const c = solveDense(A, e)?.[k];
  return c !== undefined && c > 0 && Number.isFinite(c) ? Math.sqrt(threshold * c) : undefined;
}

export interface IntervalEndOptions {
  /**
   * Estimated distance from the best point to the level (quadraticWidth): the first trial
   * goes 10 % beyond it. Without it, the first trial is 10⁻³ of |best value| away (10⁻³ when it is 0).
   */
  width?: number;
}

/**
 * The end of {χN : P − P_min ≤ threshold} on one side of the minimum (side = ±1).
 * `known` are points evaluated so far (any order); `threshold` is in P's units.
 */
export function intervalEnd(fn: ProfileFn, best: ProfiledPoint, threshold: number, side: 1 | -1, range: [number, number], known: ProfiledPoint[], opts: IntervalEndOptions = {}): IntervalEnd {
  const target = Math.sqrt(threshold);
  const s = (p: ProfiledPoint) => Math.sqrt(Math.max(0, p.value - best.value)) - target;
  const bound = side > 0 ? range[1] : range[0];
  // 10⁻³ of the value's size: a negative or zero best (a wall affinity) must still step away from it.
  const firstStep = 1e-3 * (Math.abs(best.chiN) || 1);
  let evaluations = 0;
  const onSide = known.filter((p) => (p.chiN - best.chiN) * side > 0);
  // Inner: the farthest point still inside the level; outer: the nearest point beyond it.
  let inner: ProfiledPoint = best;
  let outer: ProfiledPoint | undefined;
  for (const p of onSide) {
    const d = Math.abs(p.chiN - best.chiN);
    if (s(p) < 0) {
      if (d > Math.abs(inner.chiN - best.chiN)) inner = p;
    } else if (!outer || d < Math.abs(outer.chiN - best.chiN)) outer = p;
  }
  if (outer && Math.abs(outer.chiN - best.chiN) < Math.abs(inner.chiN - best.chiN)) inner = best;
  while (!outer) {
    const di = Math.abs(inner.chiN - best.chiN);
    const rise = inner.value - best.value;
    // Quadratic extrapolation to the level from the inner point, 10 % beyond it; doubled steps when flat.
    let d = di > 0 && rise > 1e-12 * threshold ? 1.1 * di * Math.sqrt(threshold / rise) : Math.max(firstStep, 2 * di);
    d = Math.min(d, Math.max(4 * di, firstStep));
    // The first trial, given the curvature estimate of the distance: just beyond it.
    if (di === 0 && opts.width !== undefined && opts.width > 0 && Number.isFinite(opts.width)) d = 1.1 * opts.width;
    let c = best.chiN + side * d;
    if ((c - bound) * side >= 0) c = bound;
    const p = fn(c);
    evaluations++;
    if (s(p) >= 0) outer = p;
    else {
      inner = p;
      if (c === bound) return { chiN: bound, limitedByRange: true, evaluations };
    }
  }
  const tol = 1e-4 * Math.abs(outer.chiN - best.chiN);
  const r = brentRoot((c) => s(fn(c)), inner.chiN, outer.chiN, s(inner), s(outer), tol);
  return { chiN: r.x, limitedByRange: false, evaluations: evaluations + r.evaluations };
}

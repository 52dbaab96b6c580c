/**
 * The best phase offset x0 of a periodic model curve against the data, without re-solving:
 * the misfit χ²(x0) = Σ w_i (u(x_i − x0) − φ_i)² is periodic in x0 with the model period,
 * so a scan over one period on a grid finer than the profile's features, then Brent's
 * method on the best scan cell, finds its global minimum. For f = 1/2, x0 and x0 + L/2
 * swap the A and B domains: two distinct local minima, and the scan picks the better one.
 *
 * Many points (a long measured profile): the scan and Brent's method use the moment expansion
 * of offset-misfit-moments.ts, O(modes²) per trial offset instead of O(points·modes); the
 * offset is then polished by Newton steps on the directly summed misfit, whose value is
 * returned, so tiny residuals (noise-free data) keep full precision.
 * Below MOMENTS_FROM points the direct sum is as cheap and is used throughout.
 */
import { brentMinimize } from '../numerics/brent-minimize.js';
import type { FourierSeries } from '../physics/cell/fourier-series.js';
import { OffsetMisfitMoments, polishOffset } from './offset-misfit-moments.js';

/** From this many data points on, trial offsets are scored by the moment expansion (measured: 100 000 points, docs/inverse.md). */
export const MOMENTS_FROM = 1000;

export interface FitData {
  x: Float64Array;
  phi: Float64Array;
  /** Weights 1/σ_i² (all ones when sigma is to be estimated from the residuals). */
  weight: Float64Array;
}

export interface OffsetFit {
  /** Offset in [0, L): the model's domain centre (x = 0) sits at data position x0. */
  x0: number;
  /** Weighted misfit at x0. */
  value: number;
}

export function misfit(model: FourierSeries, data: FitData, x0: number, scratch: Float64Array): number {
  model.evaluateShifted(data.x, x0, scratch);
  let s = 0;
  for (let i = 0; i < scratch.length; i++) {
    const r = scratch[i] - data.phi[i];
    s += data.weight[i] * r * r;
  }
  return s;
}

export function fitOffset(model: FourierSeries, data: FitData, scanPoints = 64): OffsetFit {
  const scratch = new Float64Array(data.x.length);
  const L = model.period;
  if (model.mode(1).amplitude < 2e-12) return { x0: 0, value: misfit(model, data, 0, scratch) };
  const k = Math.max(scanPoints, 2 * model.modes);
  const h = L / k;
  let best = 0;
  let bestValue = Infinity;
  const values = new Float64Array(k);
  const moments = data.x.length >= MOMENTS_FROM ? new OffsetMisfitMoments(model, data) : null;
  const trial = moments ? (t: number) => moments.value(t) : (t: number) => misfit(model, data, t, scratch);
  for (let j = 0; j < k; j++) {
    values[j] = trial(j * h);
    if (values[j] < bestValue) {
      bestValue = values[j];
      best = j;
    }
  }
  // Work on [L, 2L) so that Brent's relative tolerance is relative to a length of order L.
  const b = L + best * h;
  const r = brentMinimize(trial, { a: b - h, b, c: b + h, fb: bestValue }, 1e-11);
  if (moments) {
    // Past the expansion's round-off: Newton steps on the directly summed misfit.
    const p = polishOffset(model, data, r.x);
    return { x0: ((p.x0 % L) + L) % L, value: p.value };
  }
  let x0 = r.x % L;
  if (x0 < 0) x0 += L;
  return { x0, value: r.fx };
}

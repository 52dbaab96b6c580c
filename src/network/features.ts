/**
 * Input features of the networks, computed once per fixed point set (they do not change
 * between optimiser steps; sin/cos are also slow on the WASM backend).
 *
 * Exact periodicity in x with period L (Dong & Ni, J. Comput. Phys. 435, 110242, 2021):
 * the network sees x only through
 *     [sin(k_1 x), cos(k_1 x), sin(k_2 x), cos(k_2 x), …, sin(k_M x), cos(k_M x)],
 * k_m = 2π m / L (x and L in Rg), interleaved in that order. Derivative channels (exact):
 *     ∂x sin(kx) =  k cos(kx),  ∂xx sin(kx) = −k² sin(kx),
 *     ∂x cos(kx) = −k sin(kx),  ∂xx cos(kx) = −k² cos(kx),   ∂s = 0.
 * Propagator networks add one contour column σ = (s − a)/Δ (a, Δ: start and length of the
 * piece's contour interval), with ∂σ/∂s = 1/Δ and no x-dependence.
 *
 * Exact reflecting walls (a film, physics/cell/film-cell.ts): the network sees z only through
 *     [cos(k_1 z), cos(k_2 z), …, cos(k_M z)],   k_m = π m / H,
 * each even about z = 0 and z = H, so every output (an MLP of these) is even about both walls
 * and has ∂/∂z = 0 there: the zero-flux condition of the reference, by construction (the cosine
 * basis of the film's spectral solver, used as network inputs in the manner of Dong & Ni's
 * periodic features). Derivative channels: ∂z cos(kz) = −k sin(kz), ∂zz cos(kz) = −k² cos(kz).
 * A film adds two columns after the modes, the shape of each wall's surface field (film-cell.ts,
 * wallProfiles): the fields and propagators vary near a preferential wall on the scale of its
 * range, finer than the modes carry. Which features a network gets is the cell's choice
 * (Cell.features): one place.
 *
 * Soft periodicity (propagator networks only; the field network keeps the exact features):
 * the network sees x through one scaled column ξ = 2x/L − 1 (ξ ∈ [−1, 1) on the cell), so
 * nothing ties u(0, s) to u(L, s) and the `periodicity` loss term has to. Derivative
 * channels (exact): ∂x ξ = 2/L, ∂xx ξ = 0, ∂s ξ = 0; ∂x is the same at every point, so it
 * is one broadcast row, and ∂xx is null (identically zero).
 *
 * Values are computed in float64 and rounded once to float32 on upload.
 */
import type { Tf } from '../autodiff/tf.js';
import { Jet } from '../autodiff/jet.js';
import type { Cell, NetworkFeatures } from '../physics/cell/cell.js';
import { PeriodicCell } from '../physics/cell/periodic-cell.js';

/** What the networks need from a cell: its length, its features and its surface field at points. */
export type FeatureCell = Pick<Cell, 'length' | 'features' | 'surfaceFieldAt'>;

/** The periodic cell of length L, for callers that give only a period (its grid size does not matter here). */
export function periodicFeatureCell(period: number): FeatureCell {
  return new PeriodicCell(period, 4, 1);
}

/** Number of columns of the periodic features for M modes. */
export function periodicWidth(modes: number): number {
  return 2 * modes;
}

/** Number of columns of a cell's features for M modes. */
export function featureWidth(features: NetworkFeatures, modes: number): number {
  return (features.kind === 'fourier' ? 2 * modes : modes) + (features.extra?.count ?? 0);
}

/** Row-major [n, width] arrays of a cell's features (header) and their x-derivatives. */
export function cellFeatureArrays(x: ArrayLike<number>, features: NetworkFeatures, modes: number) {
  const n = x.length;
  const fourier = features.kind === 'fourier';
  const w = featureWidth(features, modes);
  const v = new Float64Array(n * w);
  const dx = new Float64Array(n * w);
  const dxx = new Float64Array(n * w);
  for (let i = 0; i < n; i++) {
    for (let m = 1; m <= modes; m++) {
      const k = features.waveNumber(m);
      const s = Math.sin(k * x[i]);
      const c = Math.cos(k * x[i]);
      if (fourier) {
        const o = i * w + 2 * (m - 1);
        v[o] = s;
        v[o + 1] = c;
        dx[o] = k * c;
        dx[o + 1] = -k * s;
        dxx[o] = -k * k * s;
        dxx[o + 1] = -k * k * c;
      } else {
        const o = i * w + (m - 1);
        v[o] = c;
        dx[o] = -k * s;
        dxx[o] = -k * k * c;
      }
    }
    if (features.extra) {
      const e = features.extra.at(x[i]);
      const o = i * w + w - features.extra.count;
      for (let c = 0; c < features.extra.count; c++) {
        v[o + c] = e.v[c];
        dx[o + c] = e.dx[c];
        dxx[o + c] = e.dxx[c];
      }
    }
  }
  return { v, dx, dxx, width: w };
}

/** Row-major [n, 2M] arrays of the periodic features and their x-derivatives. */
export function periodicFeatureArrays(x: ArrayLike<number>, period: number, modes: number) {
  return cellFeatureArrays(x, periodicFeatureCell(period).features, modes);
}

/** Feature jet of the points x for a cell; derivative channels only if `derivatives`. */
export function cellFeatures(tf: Tf, x: ArrayLike<number>, features: NetworkFeatures, modes: number, derivatives = true): Jet {
  const a = cellFeatureArrays(x, features, modes);
  const shape: [number, number] = [x.length, a.width];
  return new Jet(tf, tf.tensor2d(f32(a.v), shape), derivatives ? tf.tensor2d(f32(a.dx), shape) : null, derivatives ? tf.tensor2d(f32(a.dxx), shape) : null, null);
}

/** Feature jet [n, 2M] of the points x in a periodic cell of length `period`. */
export function periodicFeatures(tf: Tf, x: ArrayLike<number>, period: number, modes: number, derivatives = true): Jet {
  return cellFeatures(tf, x, periodicFeatureCell(period).features, modes, derivatives);
}

/** How a propagator network sees x: exact periodic features, or the scaled input ξ = 2x/L − 1. */
export type XInput = 'exact' | 'soft';

/** Columns of x features of a propagator network (the contour column comes on top). */
export function xInputWidth(modes: number, periodicity: XInput, features: NetworkFeatures = periodicFeatureCell(1).features): number {
  return periodicity === 'exact' ? featureWidth(features, modes) : 1;
}

/** Row-major [n, 1] arrays of ξ = 2x/L − 1 and its x-derivatives (2/L and 0 at every point). */
export function scaledInputArrays(x: ArrayLike<number>, period: number) {
  const n = x.length;
  const v = Float64Array.from({ length: n }, (_, i) => (2 * x[i]) / period - 1);
  return { v, dx: new Float64Array(n).fill(2 / period), dxx: new Float64Array(n), width: 1 };
}

/**
 * Feature jet [n, w + 1] of points (x_i, s_i) for a piece on the contour interval
 * [start, start + length]: the x features of the cell (a number: the periodic cell of that
 * length; w = 2M periodic or M cosine columns, or the one scaled column
 * when `periodicity` is 'soft'), then σ = (s − start)/length.
 * `ds` is the single broadcast row [0, …, 0, 1/length]; with the scaled column `dx` is the
 * broadcast row [2/L, 0] and `dxx` is null.
 */
export function propagatorFeatures(
  tf: Tf,
  x: ArrayLike<number>,
  s: ArrayLike<number>,
  cell: number | FeatureCell,
  modes: number,
  piece: { start: number; length: number },
  derivatives = true,
  periodicity: XInput = 'exact',
): Jet {
  const n = x.length;
  if (s.length !== n) throw new RangeError(`x and s differ in length (${n} and ${s.length})`);
  const c = typeof cell === 'number' ? periodicFeatureCell(cell) : cell;
  const period = c.length;
  const a = periodicity === 'exact' ? cellFeatureArrays(x, c.features, modes) : scaledInputArrays(x, period);
  const w = a.width + 1;
  const v = new Float64Array(n * w);
  const dx = new Float64Array(n * w);
  const dxx = new Float64Array(n * w);
  for (let i = 0; i < n; i++) {
    v.set(a.v.subarray(i * a.width, (i + 1) * a.width), i * w);
    dx.set(a.dx.subarray(i * a.width, (i + 1) * a.width), i * w);
    dxx.set(a.dxx.subarray(i * a.width, (i + 1) * a.width), i * w);
    v[i * w + a.width] = (s[i] - piece.start) / piece.length;
  }
  const ds = new Float64Array(w);
  ds[a.width] = 1 / piece.length;
  const shape: [number, number] = [n, w];
  if (!derivatives) return new Jet(tf, tf.tensor2d(f32(v), shape), null, null, null);
  if (periodicity === 'soft') return new Jet(tf, tf.tensor2d(f32(v), shape), tf.tensor2d([[2 / period, 0]]), null, tf.tensor2d(f32(ds), [1, w]));
  return new Jet(tf, tf.tensor2d(f32(v), shape), tf.tensor2d(f32(dx), shape), tf.tensor2d(f32(dxx), shape), tf.tensor2d(f32(ds), [1, w]));
}

/** The one rounding to float32 (tfjs tensors are float32 on every backend). */
export function f32(a: Float64Array): Float32Array {
  return Float32Array.from(a);
}

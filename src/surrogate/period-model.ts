/**
 * The equilibrium period L(θ) (Rg) between the anchors: a monotone piecewise-cubic Hermite
 * interpolant of the anchors' periods along each varying parameter, applied axis by axis
 * on the anchor grid (tensor product). Float64, outside the networks.
 *
 * Slopes (shape-preserving, so the period never overshoots between anchors): at interior
 * nodes the weighted harmonic mean of the neighbouring secants, zero where they differ in
 * sign (Fritsch & Butland, SIAM J. Sci. Stat. Comput. 5, 300 (1984)); at the ends the
 * one-sided three-point formula, clipped to keep the shape (Moler, "Numerical Computing
 * with MATLAB", SIAM 2004, §3.4). Outside the anchors the end cubic is replaced by its
 * tangent line (used only when the user allows extrapolation).
 */

function endSlope(h0: number, h1: number, d0: number, d1: number): number {
  const d = ((2 * h0 + h1) * d0 - h0 * d1) / (h0 + h1);
  if (Math.sign(d) !== Math.sign(d0)) return 0;
  if (Math.sign(d0) !== Math.sign(d1) && Math.abs(d) > Math.abs(3 * d0)) return 3 * d0;
  return d;
}

/** Node slopes of the monotone cubic through (x_i, y_i), x strictly increasing. */
export function monotoneSlopes(x: ArrayLike<number>, y: ArrayLike<number>): Float64Array {
  const n = x.length;
  const d = new Float64Array(n);
  if (n < 2) return d;
  const h = Float64Array.from({ length: n - 1 }, (_, i) => x[i + 1] - x[i]);
  const delta = Float64Array.from({ length: n - 1 }, (_, i) => (y[i + 1] - y[i]) / h[i]);
  if (n === 2) return d.fill(delta[0]);
  for (let i = 1; i < n - 1; i++) {
    if (delta[i - 1] * delta[i] <= 0) continue;
    const w1 = 2 * h[i] + h[i - 1];
    const w2 = h[i] + 2 * h[i - 1];
    d[i] = (w1 + w2) / (w1 / delta[i - 1] + w2 / delta[i]);
  }
  d[0] = endSlope(h[0], h[1], delta[0], delta[1]);
  d[n - 1] = endSlope(h[n - 2], h[n - 3], delta[n - 2], delta[n - 3]);
  return d;
}

/** Value at t of the monotone cubic through (x_i, y_i) (tangent lines beyond the ends). */
export function monotoneCubic(x: ArrayLike<number>, y: ArrayLike<number>, t: number): number {
  const n = x.length;
  if (n === 1) return y[0];
  const d = monotoneSlopes(x, y);
  if (t <= x[0]) return y[0] + d[0] * (t - x[0]);
  if (t >= x[n - 1]) return y[n - 1] + d[n - 1] * (t - x[n - 1]);
  let i = 0;
  while (t > x[i + 1]) i++;
  const h = x[i + 1] - x[i];
  const s = (t - x[i]) / h;
  // Cubic Hermite basis on [x_i, x_{i+1}].
  const h00 = (1 + 2 * s) * (1 - s) * (1 - s);
  const h10 = s * (1 - s) * (1 - s);
  const h01 = s * s * (3 - 2 * s);
  const h11 = s * s * (s - 1);
  return h00 * y[i] + h10 * h * d[i] + h01 * y[i + 1] + h11 * h * d[i + 1];
}

/**
 * Tensor-product interpolation on a grid: `axes[d]` are the node values of dimension d,
 * `values` are laid out with dimension 0 fastest (as ParameterSpace.anchors()).
 */
export function gridInterpolate(axes: number[][], values: ArrayLike<number>, at: ArrayLike<number>): number {
  if (axes.length === 0) return values[0];
  const last = axes.length - 1;
  const inner = axes.slice(0, last);
  const stride = inner.reduce((n, a) => n * a.length, 1);
  const along = axes[last].map((_, k) => gridInterpolate(inner, Array.prototype.slice.call(values, k * stride, (k + 1) * stride) as number[], at));
  return monotoneCubic(axes[last], along, at[last]);
}

/** L(θ) from the anchors' equilibrium periods (a plain object, stored in the checkpoint). */
export interface PeriodModel {
  /** Anchor values of each varying parameter, in ParameterSpace axis order. */
  axes: number[][];
  /** Anchor periods in Rg, dimension 0 fastest. */
  periods: number[];
}

export function periodAt(model: PeriodModel, values: ArrayLike<number>): number {
  return gridInterpolate(model.axes, model.periods, values);
}

/**
 * Trigonometric interpolation of a periodic grid function as a matrix: for grid values
 * u_j at x_j = jL/n, u(t) = Σ_j u_j M_j(t) with
 *   M_j(t) = (1/n) [1 + 2 Σ_{m=1}^{n/2−1} b_m cos(k_m (t − x_j)) + b_{n/2} cos(k_{n/2}(t − x_j))],
 * k_m = 2πm/L (the Nyquist mode enters once, as a cosine, for even n). A Gaussian blur of
 * standard deviation W multiplies mode m by b_m = exp(−k_m² W²/2) (convolution theorem);
 * W = 0 gives plain interpolation, exact for band-limited data.
 */
export function trigInterpolationMatrix(n: number, length: number, t: ArrayLike<number>, blur = 0): Float64Array {
  const out = new Float64Array(n * t.length);
  const half = n / 2;
  for (let j = 0; j < n; j++) {
    const xj = (j * length) / n;
    for (let i = 0; i < t.length; i++) {
      let v = 1;
      for (let m = 1; m <= half; m++) {
        const k = (2 * Math.PI * m) / length;
        const b = Math.exp(-0.5 * k * k * blur * blur);
        v += (m === half ? 1 : 2) * b * Math.cos(k * (t[i] - xj));
      }
      out[j * t.length + i] = v / n;
    }
  }
  return out;
}

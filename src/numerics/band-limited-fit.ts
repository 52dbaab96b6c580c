/**
 * Least-squares fit of a truncated Fourier series to scattered samples of a periodic
 * function (period L): u(t) ≈ a_0 + Σ_{m=1}^{M} [a_m cos(k_m t) + b_m sin(k_m t)], k_m = 2πm/L,
 * by the normal equations (common practice, no source). With M well below the number of
 * samples this is a low-pass smoother that assumes nothing but periodicity.
 */
import { linearLeastSquares } from './dense-solve.js';

export function bandLimitedFit(t: ArrayLike<number>, u: ArrayLike<number>, weights: ArrayLike<number>, period: number, modes: number): (x: ArrayLike<number>) => Float64Array {
  const p = 1 + 2 * modes;
  const basis = (x: number, out: Float64Array) => {
    out[0] = 1;
    for (let m = 1; m <= modes; m++) {
      const a = (2 * Math.PI * m * x) / period;
      out[2 * m - 1] = Math.cos(a);
      out[2 * m] = Math.sin(a);
    }
  };
  const row = new Float64Array(p);
  const [coef] = linearLeastSquares(t.length, p, (i, row) => basis(t[i], row), [u], weights);
  if (!coef) throw new Error(`band-limited fit: ${modes} modes are not determined by ${t.length} samples`);
  return (x) => {
    const out = new Float64Array(x.length);
    for (let i = 0; i < x.length; i++) {
      basis(x[i], row);
      let v = 0;
      for (let r = 0; r < p; r++) v += coef[r] * row[r];
      out[i] = v;
    }
    return out;
  };
}

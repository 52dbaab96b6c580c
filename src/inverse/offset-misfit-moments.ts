/**
 * The misfit χ²(x0) = Σ_i w_i (u(x_i − x0) − φ_i)² of a periodic model curve against many data
 * points, for many trial offsets x0, at a cost independent of the number of points.
 *
 * Units: x, x0 and the period L in Rg; u and φ are volume fractions; w_i = 1/σ_i² (or 1).
 * Convention: u is a FourierSeries (physics/cell/fourier-series.ts), written as
 *   u(x) = Re Σ_{m=0}^{H} ĉ_m z^m,  z = e^{i k1 x},  k1 = 2π/L,
 * with ĉ_0 = c_0, ĉ_m = 2 c_m (0 < m < H) and ĉ_H = Re c_H (the Nyquist cosine). A shift by x0
 * multiplies ĉ_m by s^m, s = e^{−i k1 x0}: d_m = ĉ_m s^m. Expanding the square (exact algebra,
 * common practice, no source):
 *   Σ w u² = ½ Re Σ_{m,n} d_m d_n W_{m+n} + ½ Re Σ_{m,n} d_m conj(d_n) W_{m−n},
 *   Σ w φ u = Re Σ_m d_m P_m,
 * with the data's moments W_j = Σ_i w_i z_i^j (j = 0..2H, W_{−j} = conj W_j) and
 * P_m = Σ_i w_i φ_i z_i^m, computed once per period in O(N·H). Each x0 then costs O(H²)
 * instead of O(N·H). The expansion subtracts sums of size Σ w φ², so its round-off is about
 * 1e-16 of that: fine for a scan and a minimiser, but the value at the chosen x0 should be
 * summed directly (offset-fit.ts does) when the residuals are tiny (noise-free data).
 */
import type { FourierSeries } from '../physics/cell/fourier-series.js';

export interface MisfitData {
  x: Float64Array;
  phi: Float64Array;
  weight: Float64Array;
}

export class OffsetMisfitMoments {
  private readonly H: number;
  private readonly k1: number;
  /** W_j, j = 0..2H (real and imaginary parts). */
  private readonly wRe: Float64Array;
  private readonly wIm: Float64Array;
  /** P_m, m = 0..H. */
  private readonly pRe: Float64Array;
  private readonly pIm: Float64Array;
  /** Σ w φ². */
  private readonly sumWPhi2: number;
  /** ĉ_m and the shifted coefficients d_m (scratch). */
  private readonly cRe: Float64Array;
  private readonly cIm: Float64Array;
  private readonly dRe: Float64Array;
  private readonly dIm: Float64Array;

  constructor(model: FourierSeries, data: MisfitData) {
    const H = model.modes;
    this.H = H;
    this.k1 = (2 * Math.PI) / model.period;
    this.cRe = new Float64Array(H + 1);
    this.cIm = new Float64Array(H + 1);
    for (let m = 0; m <= H; m++) {
      const factor = m === 0 || m === H ? 1 : 2;
      this.cRe[m] = factor * model.re[m];
      this.cIm[m] = m === 0 || m === H ? 0 : factor * model.im[m];
    }
    this.dRe = new Float64Array(H + 1);
    this.dIm = new Float64Array(H + 1);
    const J = 2 * H;
    this.wRe = new Float64Array(J + 1);
    this.wIm = new Float64Array(J + 1);
    this.pRe = new Float64Array(H + 1);
    this.pIm = new Float64Array(H + 1);
    let a = 0;
    const { x, phi, weight } = data;
    for (let i = 0; i < x.length; i++) {
      const w = weight[i];
      const wp = w * phi[i];
      a += wp * phi[i];
      const theta = this.k1 * x[i];
      const zr = Math.cos(theta);
      const zi = Math.sin(theta);
      let pr = 1;
      let pi = 0;
      for (let j = 0; j <= J; j++) {
        this.wRe[j] += w * pr;
        this.wIm[j] += w * pi;
        if (j <= H) {
          this.pRe[j] += wp * pr;
          this.pIm[j] += wp * pi;
        }
        const t = pr * zr - pi * zi;
        pi = pr * zi + pi * zr;
        pr = t;
      }
    }
    this.sumWPhi2 = a;
  }

  /** χ²(x0) by the moment expansion. */
  value(x0: number): number {
    const { H, dRe, dIm, cRe, cIm, wRe, wIm, pRe, pIm } = this;
    const sr = Math.cos(-this.k1 * x0);
    const si = Math.sin(-this.k1 * x0);
    let qr = 1;
    let qi = 0;
    let cross = 0;
    for (let m = 0; m <= H; m++) {
      dRe[m] = cRe[m] * qr - cIm[m] * qi;
      dIm[m] = cRe[m] * qi + cIm[m] * qr;
      cross += dRe[m] * pRe[m] - dIm[m] * pIm[m];
      const t = qr * sr - qi * si;
      qi = qr * si + qi * sr;
      qr = t;
    }
    let sum = 0;
    let herm = 0;
    for (let m = 0; m <= H; m++) {
      const ar = dRe[m];
      const ai = dIm[m];
      for (let n = 0; n <= H; n++) {
        // d_m d_n W_{m+n}
        const br = ar * dRe[n] - ai * dIm[n];
        const bi = ar * dIm[n] + ai * dRe[n];
        sum += br * wRe[m + n] - bi * wIm[m + n];
        // d_m conj(d_n) W_{m−n}
        const cr = ar * dRe[n] + ai * dIm[n];
        const ci = ai * dRe[n] - ar * dIm[n];
        const j = m - n;
        const wr = j >= 0 ? wRe[j] : wRe[-j];
        const wi = j >= 0 ? wIm[j] : -wIm[-j];
        herm += cr * wr - ci * wi;
      }
    }
    return this.sumWPhi2 - 2 * cross + 0.5 * (sum + herm);
  }
}

/**
 * Newton steps on χ²(x0) with its derivatives summed directly over the points (one O(N·H)
 * pass each): polishes an offset found through the moment expansion past that expansion's
 * round-off, so noise-free data fit as tightly as with the direct sum throughout. With
 * r_i = u(x_i − x0) − φ_i: dχ²/dx0 = −2 Σ w r u′, d²χ²/dx0² = 2 Σ w (u′² − r u″).
 * A step that does not lower the directly summed χ² is not taken. Returns x0 and χ²(x0).
 */
export function polishOffset(model: FourierSeries, data: MisfitData, x0: number, steps = 2): { x0: number; value: number } {
  let cur = directWithDerivatives(model, data, x0);
  for (let k = 0; k < steps; k++) {
    if (!(cur.d2 > 0)) break;
    const next = x0 - cur.d1 / cur.d2;
    const at = directWithDerivatives(model, data, next);
    if (!(at.value <= cur.value)) break;
    x0 = next;
    cur = at;
  }
  return { x0, value: cur.value };
}

function directWithDerivatives(model: FourierSeries, data: MisfitData, x0: number): { value: number; d1: number; d2: number } {
  const H = model.modes;
  const k1 = (2 * Math.PI) / model.period;
  const { re, im } = model;
  let value = 0;
  let d1 = 0;
  let d2 = 0;
  for (let i = 0; i < data.x.length; i++) {
    const theta = k1 * (data.x[i] - x0);
    const zr = Math.cos(theta);
    const zi = Math.sin(theta);
    let pr = 1;
    let pi = 0;
    let u = re[0];
    let up = 0;
    let upp = 0;
    for (let m = 1; m <= H; m++) {
      const t = pr * zr - pi * zi;
      pi = pr * zi + pi * zr;
      pr = t;
      // Re(ĉ z^m), and its x-derivatives: Re(i m k1 ĉ z^m), Re(−(m k1)² ĉ z^m); the Nyquist term a real cosine.
      const cr = m === H ? re[m] : 2 * re[m];
      const ci = m === H ? 0 : 2 * im[m];
      const a = cr * pr - ci * pi;
      const b = cr * pi + ci * pr;
      const mk = m * k1;
      u += a;
      up -= mk * b;
      upp -= mk * mk * a;
    }
    const r = u - data.phi[i];
    const w = data.weight[i];
    value += w * r * r;
    d1 -= 2 * w * r * up;
    d2 += 2 * w * (up * up - r * upp);
  }
  return { value, d1, d2 };
}

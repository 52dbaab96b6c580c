/**
 * A periodic grid function as its band-limited (Fourier) interpolant, so the model profile
 * can be read at arbitrary data positions with spectral accuracy (the SCFT solution on the
 * grid is spectrally accurate; linear interpolation would throw that away).
 *
 * On a grid x_j = j·L/N (N even) with c_m = (1/N) Σ_j u_j e^{−2πi m j/N}, the interpolant is
 *   u(x) = c_0 + Σ_{m=1}^{N/2−1} 2 Re(c_m e^{i k_m x}) + c_{N/2} cos(k_{N/2} x),  k_m = 2πm/L,
 * which reproduces u_j at the grid points (the Nyquist mode split evenly between ±N/2).
 * An instrument of Gaussian resolution W (standard deviation) multiplies mode m by
 * exp(−k_m² W²/2), the Fourier transform of the normalised Gaussian.
 */
import FFT from 'fft.js';

export class PeriodicProfile {
  /** Real and imaginary parts of c_m, m = 0..N/2 (already blurred and recentred). */
  readonly re: Float64Array;
  readonly im: Float64Array;
  /** Shift applied by recentre(): the model x = 0 sits at grid coordinate `shift`. */
  readonly shift: number;

  private constructor(
    readonly period: number,
    re: Float64Array,
    im: Float64Array,
    shift: number,
  ) {
    this.re = re;
    this.im = im;
    this.shift = shift;
  }

  /** Coefficients of grid values u_j over one period of length `period`. */
  static fromGrid(u: ArrayLike<number>, period: number): PeriodicProfile {
    const n = u.length;
    if (n < 2 || (n & (n - 1)) !== 0) throw new RangeError(`PeriodicProfile: grid size must be a power of two ≥ 2, got ${n}`);
    const half = n / 2;
    const re = new Float64Array(half + 1);
    const im = new Float64Array(half + 1);
    const fft = new FFT(n);
    const out = new Float64Array(2 * n);
    fft.realTransform(out, Array.from(u));
    for (let m = 0; m <= half; m++) {
      re[m] = out[2 * m] / n;
      im[m] = out[2 * m + 1] / n;
    }
    im[0] = 0;
    im[half] = 0;
    return new PeriodicProfile(period, re, im, 0);
  }

  /** A flat profile (the disordered melt): every x gives `value`. */
  static constant(value: number, period: number): PeriodicProfile {
    return new PeriodicProfile(period, Float64Array.of(value), Float64Array.of(0), 0);
  }

  get modes(): number {
    return this.re.length - 1;
  }

  /** Amplitude |c_1| of the fundamental. */
  fundamental(): number {
    return this.re.length > 1 ? Math.hypot(this.re[1], this.im[1]) : 0;
  }

  /**
   * Shift the origin so the fundamental cos(k_1 x) peaks at x = 0: for a lamella symmetric
   * about its domain centres this puts the centre of a domain rich in the profiled species
   * at x = 0, a convention independent of where the solver's grid started.
   */
  recentre(): PeriodicProfile {
    if (this.fundamental() < 1e-14) return this;
    const alpha = Math.atan2(this.im[1], this.re[1]);
    return this.withOrigin((-alpha / (2 * Math.PI)) * this.period);
  }

  /** The same function with its origin moved to grid coordinate xp: v(x) = u(x + xp), coefficients c_m e^{i k_m xp}. */
  withOrigin(xp: number): PeriodicProfile {
    const re = new Float64Array(this.re.length);
    const im = new Float64Array(this.im.length);
    const k1 = (2 * Math.PI) / this.period;
    for (let m = 0; m < this.re.length; m++) {
      const c = Math.cos(m * k1 * xp);
      const s = Math.sin(m * k1 * xp);
      re[m] = this.re[m] * c - this.im[m] * s;
      im[m] = this.re[m] * s + this.im[m] * c;
    }
    // The Nyquist term must stay a real cosine: keep only its real part (round-off level for a smooth profile).
    im[this.im.length - 1] = 0;
    return new PeriodicProfile(this.period, re, im, this.shift + xp);
  }

  /** Convolution with a normalised Gaussian of standard deviation w (same length units as the period). */
  blurred(w: number): PeriodicProfile {
    if (!(w > 0)) return this;
    const re = Float64Array.from(this.re);
    const im = Float64Array.from(this.im);
    for (let m = 1; m < re.length; m++) {
      const k = (2 * Math.PI * m) / this.period;
      const g = Math.exp(-0.5 * k * k * w * w);
      re[m] *= g;
      im[m] *= g;
    }
    return new PeriodicProfile(this.period, re, im, this.shift);
  }

  /** u(x_i − x0) for each data position, into out. */
  evaluateShifted(x: ArrayLike<number>, x0: number, out: Float64Array): Float64Array {
    const half = this.re.length - 1;
    const k1 = (2 * Math.PI) / this.period;
    const { re, im } = this;
    for (let i = 0; i < x.length; i++) {
      const theta = k1 * (x[i] - x0);
      const zr = Math.cos(theta);
      const zi = Math.sin(theta);
      let pr = 1;
      let pi = 0;
      let s = re[0];
      for (let m = 1; m < half; m++) {
        const tr = pr * zr - pi * zi;
        pi = pr * zi + pi * zr;
        pr = tr;
        s += 2 * (re[m] * pr - im[m] * pi);
      }
      // Nyquist mode: a real cosine, Re z^{N/2}.
      if (half >= 1) s += re[half] * (pr * zr - pi * zi);
      out[i] = s;
    }
    return out;
  }

  /** Values on a grid of n points over one period (n a power of two; spectral resampling). */
  toGrid(n: number): Float64Array {
    const x = new Float64Array(n);
    for (let j = 0; j < n; j++) x[j] = (j * this.period) / n;
    return this.evaluateShifted(x, 0, new Float64Array(n));
  }
}

/** Spectral resampling of a periodic grid function to n points (exact for band-limited data). */
export function resampleSpectral(u: ArrayLike<number>, n: number): Float64Array {
  if (u.length === n) return Float64Array.from(u as ArrayLike<number>);
  const p = PeriodicProfile.fromGrid(u, 1);
  if (n >= u.length) return p.toGrid(n);
  // Down-sampling: keep the modes |m| < n/2; modes ±n/2 fold onto the coarse Nyquist cosine.
  const half = n / 2;
  const out = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    const theta = (2 * Math.PI * j) / n;
    let s = p.re[0];
    for (let m = 1; m < half; m++) s += 2 * (p.re[m] * Math.cos(m * theta) - p.im[m] * Math.sin(m * theta));
    out[j] = s + 2 * p.re[half] * Math.cos(half * theta);
  }
  return out;
}

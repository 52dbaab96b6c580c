/**
 * A periodic grid function as its band-limited (trigonometric) interpolant: the one Fourier
 * machinery of the periodic cell (evaluation anywhere, shifts, Gaussian blur, resampling, the
 * phase of a mode).
 *
 * Units: lengths in the cell's units (Rg); the period is the cell length L.
 * On a grid x_j = j·L/N (N even) with c_m = (1/N) Σ_j u_j e^{−2πi m j/N}, the interpolant is
 *   u(x) = c_0 + Σ_{m=1}^{N/2−1} 2 Re(c_m e^{i k_m x}) + c_{N/2} cos(k_{N/2} x),  k_m = 2πm/L,
 * which reproduces u_j at the grid points (the Nyquist mode split evenly between ±N/2, kept as
 * a real cosine). A Gaussian blur of standard deviation W multiplies mode m by
 * exp(−k_m² W²/2) (the Fourier transform of the normalised Gaussian); a shift v(x) = u(x + δ)
 * multiplies c_m by e^{i k_m δ} (common practice, no source).
 */
import FFT from 'fft.js';

const ffts = new Map<number, FFT>();
function fftOf(n: number): FFT {
  let f = ffts.get(n);
  if (!f) {
    f = new FFT(n);
    ffts.set(n, f);
  }
  return f;
}

export class FourierSeries {
  private constructor(
    /** The period L. */
    readonly period: number,
    /** Real and imaginary parts of c_m, m = 0..N/2. */
    readonly re: Float64Array,
    readonly im: Float64Array,
  ) {}

  /** The interpolant of grid values u_j at x_j = j·L/N (N even; a power of two goes through the FFT, any other even N through the direct sum). */
  static fromGrid(u: ArrayLike<number>, period: number): FourierSeries {
    const n = u.length;
    if (n < 2 || n % 2 !== 0) throw new RangeError(`FourierSeries: grid size must be even and ≥ 2, got ${n}`);
    const half = n / 2;
    const re = new Float64Array(half + 1);
    const im = new Float64Array(half + 1);
    if ((n & (n - 1)) === 0) {
      const out = new Float64Array(2 * n);
      fftOf(n).realTransform(out, Array.from(u));
      for (let m = 0; m <= half; m++) {
        re[m] = out[2 * m] / n;
        im[m] = out[2 * m + 1] / n;
      }
    } else {
      for (let m = 0; m <= half; m++) {
        let c = 0;
        let s = 0;
        for (let j = 0; j < n; j++) {
          const a = (2 * Math.PI * m * j) / n;
          c += u[j] * Math.cos(a);
          s -= u[j] * Math.sin(a);
        }
        re[m] = c / n;
        im[m] = s / n;
      }
    }
    im[0] = 0;
    im[half] = 0;
    return new FourierSeries(period, re, im);
  }

  /** A flat function (every x gives `value`). */
  static constant(value: number, period: number): FourierSeries {
    return new FourierSeries(period, Float64Array.of(value), Float64Array.of(0));
  }

  /** Highest mode index kept (N/2 for a series from N grid values). */
  get modes(): number {
    return this.re.length - 1;
  }

  /** Amplitude a and phase θ of mode m: the mode reads a cos(k_m x + θ) (a = 2|c_m|; the Nyquist mode: a = |c_{N/2}|). */
  mode(m: number): { amplitude: number; phase: number } {
    if (m >= this.re.length) return { amplitude: 0, phase: 0 };
    const factor = m === 0 || m === this.modes ? 1 : 2;
    return { amplitude: factor * Math.hypot(this.re[m], this.im[m]), phase: Math.atan2(this.im[m], this.re[m]) };
  }

  /** v(x) = u(x + δ): c_m e^{i k_m δ}. */
  shifted(delta: number): FourierSeries {
    const re = new Float64Array(this.re.length);
    const im = new Float64Array(this.im.length);
    const k1 = (2 * Math.PI) / this.period;
    for (let m = 0; m < this.re.length; m++) {
      const c = Math.cos(m * k1 * delta);
      const s = Math.sin(m * k1 * delta);
      re[m] = this.re[m] * c - this.im[m] * s;
      im[m] = this.re[m] * s + this.im[m] * c;
    }
    // The Nyquist term must stay a real cosine: keep only its real part (round-off level for a smooth function).
    if (this.re.length > 1) im[this.im.length - 1] = 0;
    return new FourierSeries(this.period, re, im);
  }

  /** Convolution with a normalised Gaussian of standard deviation w. */
  blurred(w: number): FourierSeries {
    if (!(w > 0)) return this;
    const re = Float64Array.from(this.re);
    const im = Float64Array.from(this.im);
    for (let m = 1; m < re.length; m++) {
      const k = (2 * Math.PI * m) / this.period;
      const g = Math.exp(-0.5 * k * k * w * w);
      re[m] *= g;
      im[m] *= g;
    }
    return new FourierSeries(this.period, re, im);
  }

  /** u(x_i − x0) at each point, into out. */
  evaluateShifted(x: ArrayLike<number>, x0: number, out: Float64Array = new Float64Array(x.length)): Float64Array {
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

  evaluate(x: ArrayLike<number>): Float64Array {
    return this.evaluateShifted(x, 0);
  }

  /**
   * Values on a grid of n points over one period (through the FFT when n is a power of two): zero-padding when n is
   * larger than the series' grid; when smaller, the modes |m| < n/2 are kept and modes ±n/2
   * fold onto the coarse Nyquist cosine (exact for data band-limited below n/2).
   */
  toGrid(n: number): Float64Array {
    if (n < 2 || n % 2 !== 0) throw new RangeError(`FourierSeries.toGrid: n must be even and ≥ 2, got ${n}`);
    if ((n & (n - 1)) !== 0) {
      if (n < 2 * this.modes) throw new RangeError(`FourierSeries.toGrid: down-sampling to ${n} points needs a power of two`);
      return this.evaluate(Float64Array.from({ length: n }, (_, j) => (j * this.period) / n));
    }
    const half = n / 2;
    const spec = new Float64Array(2 * n);
    const top = Math.min(half, this.modes);
    for (let m = 0; m <= top; m++) {
      // Bin weights: the coarse Nyquist bin takes both ±n/2 when the series holds a finer mode
      // there (2 Re c); the series' own Nyquist cosine splits evenly over ±m on a finer grid.
      const weight = m === half && this.modes > half ? 2 : m === this.modes && m < half ? 0.5 : 1;
      spec[2 * m] = weight * this.re[m] * n;
      spec[2 * m + 1] = m === half ? 0 : weight * this.im[m] * n;
      if (m > 0 && m < half) {
        spec[2 * (n - m)] = weight * this.re[m] * n;
        spec[2 * (n - m) + 1] = -weight * this.im[m] * n;
      }
    }
    const out = new Float64Array(2 * n);
    fftOf(n).inverseTransform(out, spec);
    const u = new Float64Array(n);
    for (let j = 0; j < n; j++) u[j] = out[2 * j];
    return u;
  }
}

/**
 * Spectral application of exp(D h ∂²/∂x²) on the periodic grid: multiply the Fourier
 * coefficients by exp(−k² D h), k = 2πm/L with m folded to [−Nx/2, Nx/2). FFTs by fft.js
 * (float64, radix-4). The Nyquist mode m = −Nx/2 is kept with k = π Nx / L (it is real for
 * real data and symmetric in its sign, so the result stays real).
 */
import FFT from 'fft.js';

export class DiffusionOperator {
  private readonly fft: FFT;
  private readonly spectrum: Float64Array;
  private readonly back: Float64Array;
  /** k² for each of the nx Fourier modes. */
  readonly k2: Float64Array;

  constructor(
    readonly nx: number,
    readonly length: number,
  ) {
    this.fft = new FFT(nx);
    this.spectrum = new Float64Array(2 * nx);
    this.back = new Float64Array(2 * nx);
    this.k2 = new Float64Array(nx);
    for (let m = 0; m < nx; m++) {
      const mm = m < nx / 2 ? m : m - nx;
      const k = (2 * Math.PI * mm) / length;
      this.k2[m] = k * k;
    }
  }

  /** Multiplier exp(−k² D h) for diffusivity D and contour step h. */
  multiplier(diffusivity: number, h: number): Float64Array {
    const out = new Float64Array(this.nx);
    for (let m = 0; m < this.nx; m++) out[m] = Math.exp(-this.k2[m] * diffusivity * h);
    return out;
  }

  /** q ← IFFT(mult · FFT(q)), in place. */
  apply(q: Float64Array, mult: Float64Array): void {
    const { spectrum, back, nx } = this;
    this.fft.realTransform(spectrum, q);
    this.fft.completeSpectrum(spectrum);
    for (let m = 0; m < nx; m++) {
      spectrum[2 * m] *= mult[m];
      spectrum[2 * m + 1] *= mult[m];
    }
    this.fft.inverseTransform(back, spectrum);
    for (let j = 0; j < nx; j++) q[j] = back[2 * j];
  }
}

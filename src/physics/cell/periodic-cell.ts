/**
 * The periodic cell: length L in Rg holding `periods` lamellar periods, grid x_j = j·L/N with N
 * a power of two (the FFT needs it). Cell averages are plain grid means (spectrally exact);
 * the diffusion step multiplies Fourier mode m by exp(−k_m² D h), k = 2πm/L with m folded to
 * [−N/2, N/2) (FFTs by fft.js, float64, radix-4). The Nyquist mode m = −N/2 is kept with
 * k = πN/L: it is real for real data and symmetric in its sign, so the result stays real.
 * Interpolation, shifts, blur and resampling go through the trigonometric interpolant
 * (fourier-series.ts). Network features are sin and cos(2πm x/L), exactly periodic
 * (Dong & Ni, J. Comput. Phys. 435, 110242 (2021)).
 */
import FFT from 'fft.js';
import { ModelError } from '../chain.js';
import type { Cell, CellDescription, DiffusionStep, NetworkFeatures, TranslationMode } from './cell.js';
import { cardinalMatrix } from './cardinal-matrix.js';
import { FourierSeries } from './fourier-series.js';

export const MAX_POINTS = 8192;

class PeriodicDiffusion implements DiffusionStep {
  private readonly fft: FFT;
  private readonly spectrum: Float64Array;
  private readonly back: Float64Array;
  private readonly packed: Float64Array;
  private readonly k2: Float64Array;

  constructor(
    private readonly n: number,
    length: number,
  ) {
    this.fft = new FFT(n);
    this.spectrum = new Float64Array(2 * n);
    this.back = new Float64Array(2 * n);
    this.packed = new Float64Array(2 * n);
    this.k2 = new Float64Array(n);
    for (let m = 0; m < n; m++) {
      const mm = m < n / 2 ? m : m - n;
      const k = (2 * Math.PI * mm) / length;
      this.k2[m] = k * k;
    }
  }

  multiplier(diffusivity: number, h: number): Float64Array {
    const out = new Float64Array(this.n);
    for (let m = 0; m < this.n; m++) out[m] = Math.exp(-this.k2[m] * diffusivity * h);
    return out;
  }

  apply(q: Float64Array, mult: Float64Array): void {
    const { spectrum, back, n } = this;
    this.fft.realTransform(spectrum, q);
    this.fft.completeSpectrum(spectrum);
    for (let m = 0; m < n; m++) {
      spectrum[2 * m] *= mult[m];
      spectrum[2 * m + 1] *= mult[m];
    }
    this.fft.inverseTransform(back, spectrum);
    for (let j = 0; j < n; j++) q[j] = back[2 * j];
  }

  /**
   * z = a + i b in one complex FFT: with Z_k its transform, A_k = (Z_k + Z̄_{−k})/2 and
   * B_k = (Z_k − Z̄_{−k})/2i, so Ma A + i Mb B = ½(Ma + Mb) Z_k + ½(Ma − Mb) Z̄_{−k}; the inverse
   * transform of that is a' + i b' (both real, the multipliers being real and even in k).
   */
  applyPair(a: Float64Array, ma: Float64Array, b: Float64Array, mb: Float64Array): void {
    const { spectrum, back, packed, n } = this;
    for (let j = 0; j < n; j++) {
      packed[2 * j] = a[j];
      packed[2 * j + 1] = b[j];
    }
    this.fft.transform(spectrum, packed);
    for (let k = 0; k < n; k++) {
      const kk = (n - k) & (n - 1);
      const zr = spectrum[2 * k];
      const zi = spectrum[2 * k + 1];
      const cr = spectrum[2 * kk];
      const ci = -spectrum[2 * kk + 1];
      const p = 0.5 * (ma[k] + mb[k]);
      const m = 0.5 * (ma[k] - mb[k]);
      packed[2 * k] = p * zr + m * cr;
      packed[2 * k + 1] = p * zi + m * ci;
    }
    this.fft.inverseTransform(back, packed);
    for (let j = 0; j < n; j++) {
      a[j] = back[2 * j];
      b[j] = back[2 * j + 1];
    }
  }
}

export class PeriodicCell implements Cell {
  readonly kind = 'periodic' as const;
  readonly boundary = 'periodic' as const;
  readonly x: Float64Array;
  readonly translation: TranslationMode;
  readonly features: NetworkFeatures;
  readonly surfaceField = null;

  surfaceFieldAt(): null {
    return null;
  }
  private readonly field: string;

  /**
   * @param length L in Rg; @param n grid points (a power of two ≥ 4); @param periods whole
   * lamellar periods the cell is set up for. `field` names the config path in errors.
   */
  constructor(
    readonly length: number,
    readonly n: number,
    readonly periods = 1,
    field = 'cell',
  ) {
    if (!(length > 0) || !Number.isFinite(length)) throw new ModelError(`${field}.period`, length, 'allowed: a finite length > 0 (in Rg)');
    if (!Number.isInteger(n) || n < 4 || n > MAX_POINTS || n % 2 !== 0) {
      throw new ModelError(`${field}.nx`, n, `allowed: an even number of points from 4 to ${MAX_POINTS} (a power of two for the spectral solver)`);
    }
    this.field = field;
    if (!Number.isInteger(periods) || periods < 1) throw new ModelError(`${field}.periods`, periods, 'allowed: a whole number of periods ≥ 1');
    this.x = this.gridWith(n);
    const k = (m: number) => (2 * Math.PI * m) / length;
    this.translation = {
      mode: (u, m) => FourierSeries.fromGrid(u, length).mode(m),
      shift: (u, delta) => (delta === 0 ? Float64Array.from(u) : this.shiftExact(u, delta)),
      waveNumber: k,
    };
    this.features = { kind: 'fourier', waveNumber: k };
  }

  startPattern(): { pattern: Float64Array; waveNumber: number } {
    const k = (2 * Math.PI * this.periods) / this.length;
    return { pattern: Float64Array.from(this.x, (x) => Math.cos(k * x)), waveNumber: k };
  }

  /** x_j = j·L/n: the first point on x = 0. */
  gridWith(n: number): Float64Array {
    return Float64Array.from({ length: n }, (_, j) => (j * this.length) / n);
  }

  /** A shift by a whole number of grid steps is a roll (exact); any other goes through the interpolant. */
  private shiftExact(u: ArrayLike<number>, delta: number): Float64Array {
    const steps = (delta * this.n) / this.length;
    const whole = Math.round(steps);
    if (Math.abs(steps - whole) < 1e-12 * Math.max(1, Math.abs(steps))) {
      const n = this.n;
      const r = ((whole % n) + n) % n;
      return Float64Array.from({ length: n }, (_, j) => u[(j + r) % n]);
    }
    return FourierSeries.fromGrid(u, this.length).shifted(delta).toGrid(this.n);
  }

  mean(u: ArrayLike<number>): number {
    let s = 0;
    for (let i = 0; i < u.length; i++) s += u[i];
    return s / u.length;
  }

  /** The FFT diffusion step: it needs a power of two (the spectral solver's grids always are). */
  diffusion(): DiffusionStep {
    if ((this.n & (this.n - 1)) !== 0) throw new ModelError(`${this.field}.nx`, this.n, 'allowed: a power of two (the FFT needs it)');
    return new PeriodicDiffusion(this.n, this.length);
  }

  series(u: ArrayLike<number>): FourierSeries {
    return FourierSeries.fromGrid(u, this.length);
  }

  interpolate(u: ArrayLike<number>, at: ArrayLike<number>, blur = 0): Float64Array {
    return this.series(u).blurred(blur).evaluate(at);
  }

  interpolationMatrix(at: ArrayLike<number>, blur = 0): Float64Array {
    return cardinalMatrix(this.n, at, (e, points) => this.interpolate(e, points, blur));
  }

  resample(u: ArrayLike<number>, n: number): Float64Array {
    if (u.length === n) return Float64Array.from(u);
    return FourierSeries.fromGrid(u, this.length).toGrid(n);
  }

  blur(u: ArrayLike<number>, width: number): Float64Array {
    if (!(width > 0)) return Float64Array.from(u);
    return this.series(u).blurred(width).toGrid(u.length);
  }

  withLength(length: number): PeriodicCell {
    return new PeriodicCell(length, this.n, this.periods);
  }

  withPoints(n: number): PeriodicCell {
    return new PeriodicCell(this.length, n, this.periods);
  }

  withPeriods(periods: number): PeriodicCell {
    return new PeriodicCell(this.length, this.n, periods);
  }

  describe(): CellDescription {
    return { kind: 'periodic', length: this.length, n: this.n, periods: this.periods };
  }
}

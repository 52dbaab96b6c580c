/**
 * The film: a melt between two flat impenetrable walls at z = 0 and z = H.
 *
 * Units: z and H in Rg; the surface field in kT per chain; affinities in kT per chain × Rg
 * (docs/physics.md, "Films").
 * Formulation: reflecting walls, i.e. zero-flux (Neumann) conditions ∂q/∂z = 0 for q and q†
 * at both walls, solved pseudo-spectrally in the cosine basis cos(πmz/H), each wall with a
 * short-range surface field that favours A (affinity Λ > 0) or B (Λ < 0); the melt is
 * incompressible up to the walls. Grid: cell centres z_j = (j + ½)H/n, n a power of
 * two, where the midpoint rule is spectrally exact for the cosine basis (cell averages are plain
 * grid means). The cosine transform is done as the FFT of the even extension: a reflecting
 * wall is a mirror plane, so the film is exactly the half of a periodic cell of length 2H with
 * 2n points that is even about both walls, and every periodic operation (diffusion, Fourier
 * interpolation, blur) applied to that extension keeps it even (common practice, no source).
 *
 * Surface field: h(z) = Λ_b g(z) + Λ_t g(H − z), g(z) = √(2/π)/λ · exp(−z²/(2λ²)), so that
 * ∫_0^∞ g dz = 1 and each wall's integrated field is its affinity Λ. A half-Gaussian is even
 * about its wall, so the field stays smooth in the even extension and the free energy
 * converges spectrally with the grid (an exponential profile would have a kink there).
 * No wall layer: a wall profile that brings the total density to zero at a reflecting wall
 * (Matsen, J. Chem. Phys. 106, 7781 (1997)) needs a pressure field that grows without bound
 * at the wall as the grid reaches it; tried here (½[1 − cos(πz/ε)], ε = 0.4 Rg, 64 points,
 * H = D, χN = 15, Λ = 1), the field iteration stalled at a residual of 0.8 kT after 2000
 * iterations. Without it the free energy converges spectrally with the grid (docs/physics.md,
 * "Films"; tests/spectral/film.test.ts).
 */
import { ModelError } from '../chain.js';
import type { Cell, CellDescription, DiffusionStep, NetworkFeatures, WallsDescription } from './cell.js';
import { cardinalMatrix } from './cardinal-matrix.js';
import { FourierSeries } from './fourier-series.js';
import { PeriodicCell } from './periodic-cell.js';

export const DEFAULT_WALL_RANGE = 0.25;

export class FilmCell implements Cell {
  readonly kind = 'film' as const;
  readonly boundary = 'reflecting' as const;
  readonly periods = 0;
  readonly x: Float64Array;
  readonly translation = null;
  readonly features: NetworkFeatures;
  readonly surfaceField: Float64Array | null;
  /** The mirror-extended periodic cell (length 2H, 2n points, offset by half a grid step). */
  private readonly mirror: PeriodicCell;

  constructor(
    readonly length: number,
    readonly n: number,
    readonly walls: WallsDescription,
    private readonly field = 'cell',
  ) {
    if (!(length > 0) || !Number.isFinite(length)) throw new ModelError(`${field}.thickness`, length, 'allowed: a finite thickness > 0 (in Rg)');
    if (!Number.isInteger(n) || n < 4 || (n & (n - 1)) !== 0) throw new ModelError(`${field}.nx`, n, 'allowed: a power of two ≥ 4 (the cosine transform goes through the FFT)');
    if (!(walls.range > 0)) throw new ModelError(`${field}.walls.range`, walls.range, 'allowed: a range > 0 (Rg)');
    this.x = this.gridWith(n);
    this.mirror = new PeriodicCell(2 * length, 2 * n, 1, field);
    this.features = { kind: 'cosine', waveNumber: (m) => (Math.PI * m) / length, extra: { count: 2, at: (z) => this.wallProfiles(z) } };
    this.surfaceField = this.surfaceFieldAt(this.x);
  }

  /**
   * The shape of each wall's surface field as network inputs, p_b(z) = exp(−z²/2λ²) and
   * p_t(z) = exp(−(H − z)²/2λ²), with z-derivatives. Each is even about its own wall and its
   * slope at the other wall is (H/λ²)·exp(−H²/2λ²), below float64 resolution for H > 10λ
   * (and under 1e-3 for H ≥ 5λ): the networks' outputs keep zero slope at both walls.
   * Given with neutral walls too, so the networks' shape does not depend on the affinities.
   */
  private wallProfiles(z: number): { v: number[]; dx: number[]; dxx: number[] } {
    const l2 = this.walls.range * this.walls.range;
    const one = (d: number, sign: number) => {
      const e = Math.exp(-(d * d) / (2 * l2));
      return { v: e, dx: (sign * -d * e) / l2, dxx: ((d * d) / l2 - 1) * (e / l2) };
    };
    const b = one(z, 1);
    const t = one(this.length - z, -1);
    return { v: [b.v, t.v], dx: [b.dx, t.dx], dxx: [b.dxx, t.dxx] };
  }

  /** h(z) of the header at points z (Rg); null with two neutral walls. */
  surfaceFieldAt(z: ArrayLike<number>): Float64Array | null {
    const { bottom, top, range } = this.walls;
    if (bottom.affinity === 0 && top.affinity === 0) return null;
    const g = (d: number) => (Math.sqrt(2 / Math.PI) / range) * Math.exp(-(d * d) / (2 * range * range));
    return Float64Array.from(z, (v) => bottom.affinity * g(v) + top.affinity * g(this.length - v));
  }

  /** The even extension: u_0 … u_{n−1}, u_{n−1} … u_0 on the mirror cell's grid (shifted by half a step). */
  private extend(u: ArrayLike<number>): Float64Array {
    const n = u.length;
    const v = new Float64Array(2 * n);
    for (let j = 0; j < n; j++) {
      v[j] = u[j];
      v[2 * n - 1 - j] = u[j];
    }
    return v;
  }

  /** The interpolant of grid values as a Fourier series of the mirror cell, in the mirror grid's own frame (z − Δ/2). */
  private series(u: ArrayLike<number>): FourierSeries {
    return FourierSeries.fromGrid(this.extend(u), 2 * this.length);
  }

  /** z_j = (j + ½)·H/n: cell centres, half a step from each wall (the cosine transform's grid). */
  gridWith(n: number): Float64Array {
    return Float64Array.from({ length: n }, (_, j) => ((j + 0.5) * this.length) / n);
  }

  /**
   * m half-periods between the walls, m ≈ 2H/D: with both walls preferring the same block m is
   * even (that block at both walls), with opposite preferences m is odd; a neutral wall leaves
   * the nearest m. The sign puts the bottom wall's preferred block there (A when neutral).
   */
  startPattern(bulkPeriod: number): { pattern: Float64Array; waveNumber: number } {
    const b = Math.sign(this.walls.bottom.affinity);
    const t = Math.sign(this.walls.top.affinity);
    const ideal = (2 * this.length) / bulkPeriod;
    let m = Math.max(1, Math.round(ideal));
    if (b !== 0 && t !== 0 && m % 2 !== (b === t ? 0 : 1)) {
      // The nearest count of the parity the walls ask for.
      m = m - 1 >= 1 && ideal - (m - 1) <= m + 1 - ideal ? m - 1 : m + 1;
    }
    const k = (Math.PI * m) / this.length;
    const sign = b < 0 ? -1 : 1;
    return { pattern: Float64Array.from(this.x, (z) => sign * Math.cos(k * z)), waveNumber: k };
  }

  mean(u: ArrayLike<number>): number {
    let s = 0;
    for (let i = 0; i < u.length; i++) s += u[i];
    return s / u.length;
  }

  diffusion(): DiffusionStep {
    const inner = this.mirror.diffusion();
    const n = this.n;
    const ext = new Float64Array(2 * n);
    const ext2 = new Float64Array(2 * n);
    const extend = (q: Float64Array, into: Float64Array) => {
      for (let j = 0; j < n; j++) {
        into[j] = q[j];
        into[2 * n - 1 - j] = q[j];
      }
    };
    return {
      multiplier: (d, h) => inner.multiplier(d, h),
      apply: (q, mult) => {
        extend(q, ext);
        inner.apply(ext, mult);
        for (let j = 0; j < n; j++) q[j] = ext[j];
      },
      applyPair: (a, ma, b, mb) => {
        extend(a, ext);
        extend(b, ext2);
        inner.applyPair(ext, ma, ext2, mb);
        for (let j = 0; j < n; j++) {
          a[j] = ext[j];
          b[j] = ext2[j];
        }
      },
    };
  }

  interpolate(u: ArrayLike<number>, at: ArrayLike<number>, blur = 0): Float64Array {
    const half = this.length / u.length / 2;
    return this.series(u).blurred(blur).evaluateShifted(at, half);
  }

  interpolationMatrix(at: ArrayLike<number>, blur = 0): Float64Array {
    return cardinalMatrix(this.n, at, (e, points) => this.interpolate(e, points, blur));
  }

  resample(u: ArrayLike<number>, n: number): Float64Array {
    if (u.length === n) return Float64Array.from(u);
    return this.interpolate(u, this.gridWith(n));
  }

  blur(u: ArrayLike<number>, width: number): Float64Array {
    if (!(width > 0)) return Float64Array.from(u);
    return this.interpolate(u, this.gridWith(u.length), width);
  }

  withLength(length: number): FilmCell {
    return new FilmCell(length, this.n, this.walls, this.field);
  }

  withPoints(n: number): FilmCell {
    return new FilmCell(this.length, n, this.walls, this.field);
  }

  describe(): CellDescription {
    return { kind: 'film', length: this.length, n: this.n, walls: this.walls };
  }
}

/**
 * A one-dimensional domain for SCFT: its grid and quadrature, its diffusion step, its
 * interpolant, its symmetry (translation), and the network features that obey its boundary
 * condition. Every solver, network, inverse tool and report takes a Cell, so a new geometry
 * is one new implementation of this interface (see DEVELOPERS.md, "Adding a cell kind").
 *
 * Units: lengths in Rg of the whole chain (docs/physics.md). The cell's `length` is the
 * periodic cell's L or the film's thickness H; grid values are point values at `x`.
 */

export type CellKind = 'periodic' | 'film';

/** The boundary condition the propagators obey at the cell's ends. */
export type BoundaryKind = 'periodic' | 'reflecting';

/** A plain description of a cell: what a file stores and what `makeCell` rebuilds. */
export type CellDescription =
  | { kind: 'periodic'; length: number; n: number; periods: number }
  | { kind: 'film'; length: number; n: number; walls: WallsDescription };

export interface WallsDescription {
  /** Affinity of each wall for A (kT per chain; see docs/physics.md, "Films"). */
  bottom: { affinity: number };
  top: { affinity: number };
  /** Range of the short-range surface field (Rg). */
  range: number;
}

/** exp(D h ∂²/∂x²) on the cell's grid with its boundary condition, for one (D, h). */
export interface DiffusionStep {
  /** The multiplier of each spectral mode for diffusivity D = (b_K/b)² and contour step h. */
  multiplier(diffusivity: number, h: number): Float64Array;
  /** q ← the diffused q, in place. */
  apply(q: Float64Array, multiplier: Float64Array): void;
  /** Two independent diffusions at once, a with its multiplier and b with its own, in place (one complex transform pair for two real ones). */
  applyPair(a: Float64Array, multiplierA: Float64Array, b: Float64Array, multiplierB: Float64Array): void;
}

/** The symmetry of a translation-invariant cell: a lamella can slide along x. */
export interface TranslationMode {
  /** Amplitude and phase θ of mode m of a grid function: the mode reads a cos(k_m x + θ). */
  mode(u: ArrayLike<number>, m: number): { amplitude: number; phase: number };
  /** The grid values of v(x) = u(x + δ) (spectrally exact for band-limited u). */
  shift(u: ArrayLike<number>, delta: number): Float64Array;
  /** Wave number of mode m, k_m. */
  waveNumber(m: number): number;
}

/** How network inputs are built so that every network output obeys the boundary condition. */
export interface NetworkFeatures {
  /** 'fourier': sin and cos(k_m x); 'cosine': cos(k_m x) (zero slope at both walls). */
  kind: 'fourier' | 'cosine';
  waveNumber(m: number): number;
  /**
   * Further input columns that obey the same boundary condition, after the modes: a film's wall
   * profiles (the shape of each wall's surface field, narrower than any mode the networks get).
   * Values and x-derivatives at one point; absent: none.
   */
  extra?: { count: number; at(x: number): { v: number[]; dx: number[]; dxx: number[] } };
}

export interface Cell {
  readonly kind: CellKind;
  readonly boundary: BoundaryKind;
  /** L (periodic) or H (film), in Rg. */
  readonly length: number;
  /** Grid points. */
  readonly n: number;
  /** The grid x_j (Rg): gridWith(n). */
  readonly x: Float64Array;
  /** Where this kind of cell puts n grid points (Rg), for any n ≥ 1: output and resampling grids share the solver's convention. */
  gridWith(n: number): Float64Array;
  /** Whole lamellar periods the cell is set up for (periodic), 0 when the cell does not fix them (film). */
  readonly periods: number;
  /** Cell average (1/L)∫u dx from grid values (spectrally exact on both kinds of grid). */
  mean(u: ArrayLike<number>): number;
  diffusion(): DiffusionStep;
  /** The band-limited interpolant of grid values at arbitrary points, optionally blurred by a Gaussian of standard deviation `blur`. */
  interpolate(u: ArrayLike<number>, at: ArrayLike<number>, blur?: number): Float64Array;
  /** The same interpolant as a matrix M (n × at.length, row-major by grid point): u(at_i) = Σ_j u_j M[j·m + i]. */
  interpolationMatrix(at: ArrayLike<number>, blur?: number): Float64Array;
  /** The grid values on a grid of `n` points over the same cell (spectral resampling). */
  resample(u: ArrayLike<number>, n: number): Float64Array;
  /** Convolution with a normalised Gaussian of standard deviation `width`. */
  blur(u: ArrayLike<number>, width: number): Float64Array;
  /** The same kind of cell with another length (grid values then scale with x/L) or number of points. */
  withLength(length: number): Cell;
  withPoints(n: number): Cell;
  /** The cell's translation symmetry, or null when walls fix the origin. */
  readonly translation: TranslationMode | null;
  /**
   * The shape of a lamellar start, cos(k x) with unit amplitude and an A-rich maximum at
   * x = 0 (a film's bottom wall, unless that wall prefers B), and its wave number k. A periodic
   * cell uses its own periods; a film fits whole half-periods of the bulk period D between its
   * walls, as the walls' preferences allow.
   */
  startPattern(bulkPeriod: number): { pattern: Float64Array; waveNumber: number };
  readonly features: NetworkFeatures;
  /** For a film: the walls' surface field h(x) (kT per chain; it lowers w_A and raises w_B by h); null: none. */
  readonly surfaceField: Float64Array | null;
  /** The same surface field at arbitrary points x (Rg), e.g. a network's collocation points; null: none. */
  surfaceFieldAt(x: ArrayLike<number>): Float64Array | null;
  describe(): CellDescription;
}

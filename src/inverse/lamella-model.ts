/**
 * The forward model of the inversion: the mean-field lamella (one period per cell) at a
 * trial χN, at a given period or at the equilibrium (stress-free) period, on one grid.
 *
 * Every solve is warm-started from the ordered solution nearest in (ln χN, ln L) found so
 * far (or, failing that, from a coarser model's, resampled spectrally); a solve that
 * collapses to the disordered state is retried once from the RPA mode and, if it still
 * collapses, is kept as a disordered point that never becomes a warm start. Solutions are
 * cached by (χN, L), so repeated evaluations (Brent's last point, noise draws that share a
 * model) cost nothing.
 */
import { RunFailure } from '../io/errors.js';
import type { SpectralOptions } from '../io/schemas/spectral-schema.js';
import type { ChainSpec, SystemSpec } from '../physics/chain-schema.js';
import { buildChain } from '../physics/chain.js';
import type { Chain } from '../physics/chain.js';
import { FourierSeries } from '../physics/cell/fourier-series.js';
import { PeriodicCell } from '../physics/cell/periodic-cell.js';
import { contourWithTotal } from '../physics/contour.js';
import type { Contour } from '../physics/contour.js';
import type { SpeciesArrays } from '../physics/fields.js';
import type { ScftSolution } from '../physics/result.js';
import { spinodal } from '../physics/rpa.js';
import { periodGuess } from '../spectral/period-search.js';
import { cellStress } from '../spectral/period-stress.js';
import { solveFixedCell } from '../spectral/scft-solver.js';
import { findStressFree, StressSearchFailure } from '../spectral/stress-free-search.js';

export interface ModelPoint {
  chiN: number;
  /** Period in Rg (NaN for a disordered point in equilibrium mode). */
  period: number;
  phase: 'lamellar' | 'disordered';
  /** φ_A as its band-limited interpolant (in the phase convention: an A-domain centre at x = 0). */
  profile: FourierSeries;
  solution: ScftSolution;
  /** dF/dL at this point (equilibrium mode): ~0 at the stress-free period. */
  stress?: number;
  /** d²F/dL² along the solutions (the secant slope of the stress search), for the next search. */
  stressSlope?: number;
}

export interface ModelSpec {
  chain: ChainSpec;
  nx: number;
  ns: number;
  options?: Partial<SpectralOptions>;
}

export interface ModelCounters {
  solves: number;
  iterations: number;
  cacheHits: number;
}

/**
 * Relative tolerance on the stress-free period. A relative period error e moves φ by about
 * e·L·|dφ/dx| ≲ 1e-5 and χN by about 5e (dlnL/dlnχN ≈ 0.2): far below any data noise and
 * below the 1e-4 asked of a noiseless recovery.
 */
const PERIOD_REL_TOL = 1e-6;

export class LamellaModel {
  readonly chain: Chain;
  readonly contour: Contour;
  /** The model's cell at unit length (one period; lengths are set per solve). */
  readonly cell: PeriodicCell;
  readonly chiNSpinodal: number;
  readonly counters: ModelCounters = { solves: 0, iterations: 0, cacheHits: 0 };
  private readonly ordered: ModelPoint[] = [];
  private readonly cache = new Map<string, ModelPoint>();
  private readonly equilibriumCache = new Map<number, ModelPoint>();
  /** Ordered equilibrium points sorted by χN (for neighbour look-ups in O(log n)). */
  private readonly equilibriumSorted: ModelPoint[] = [];

  constructor(
    readonly spec: ModelSpec,
    /** A coarser model whose solutions may seed this one's first solves. */
    readonly seed?: LamellaModel,
  ) {
    this.chain = buildChain(spec.chain);
    this.contour = contourWithTotal(this.chain, spec.ns, 'cell.ns');
    this.cell = new PeriodicCell(1, spec.nx, 1);
    this.chiNSpinodal = spinodal(this.chain).chiN;
  }

  private system(chiN: number): SystemSpec {
    return { chain: this.spec.chain, chiN };
  }

  /** Nearest ordered point in (ln χN, ln L); L NaN means "any period". */
  nearest(chiN: number, period: number): ModelPoint | undefined {
    let best: ModelPoint | undefined;
    let bestD = Infinity;
    for (const p of this.ordered) {
      const d = Math.abs(Math.log(p.chiN / chiN)) + (Number.isNaN(period) ? 0 : Math.abs(Math.log(p.period / period)));
      if (d < bestD) {
        bestD = d;
        best = p;
      }
    }
    return best;
  }

  private warmStart(chiN: number, period: number): SpeciesArrays | undefined {
    if (Number.isNaN(period) && this.equilibriumSorted.length > 0) return this.extrapolatedFields(chiN) ?? this.stencil(chiN)[0].solution.w;
    const near = this.nearest(chiN, period);
    if (near) return near.solution.w;
    const s = Number.isNaN(period) ? this.seed?.equilibriumNear(chiN) ?? this.seed?.nearest(chiN, period) : this.seed?.nearest(chiN, period);
    if (!s) return undefined;
    return { A: this.cell.resample(s.solution.w.A, this.spec.nx), B: this.cell.resample(s.solution.w.B, this.spec.nx) };
  }

  private solve(chiN: number, period: number, initial: SpeciesArrays | undefined, start?: SpectralOptions['start']): ScftSolution {
    const options = { ...this.spec.options, ...(start ? { start } : {}) };
    const sol = solveFixedCell({ system: this.system(chiN), cell: this.cell.withLength(period), contour: this.contour, options, initial });
    this.counters.solves++;
    this.counters.iterations += sol.iterations;
    if (!sol.converged) throw new RunFailure(`model solve at χN = ${chiN}, L = ${period} Rg did not converge: ${sol.notes.join('; ')}`);
    return sol;
  }

  private point(chiN: number, period: number, sol: ScftSolution, stress?: number): ModelPoint {
    const ordered = sol.phase === 'lamellar';
    const profile = ordered ? FourierSeries.fromGrid(sol.phi.A, period) : FourierSeries.constant(this.chain.speciesFraction.A, period);
    return { chiN, period, phase: ordered ? 'lamellar' : 'disordered', profile, solution: sol, stress };
  }

  /** Solve at (χN, L) from the best warm start; one cold retry from the RPA mode on a collapse. */
  private solveOrdered(chiN: number, period: number, initial: SpeciesArrays | undefined): ScftSolution {
    const sol = this.solve(chiN, period, initial);
    if (sol.phase === 'lamellar' || !initial) return sol;
    return this.solve(chiN, period, undefined, { type: 'rpa' });
  }

  /** The lamella at a given period (Rg). */
  at(chiN: number, period: number): ModelPoint {
    const key = `${chiN}|${period}`;
    const hit = this.cache.get(key);
    if (hit) {
      this.counters.cacheHits++;
      return hit;
    }
    const sol = this.solveOrdered(chiN, period, this.warmStart(chiN, period));
    const p = this.point(chiN, period, sol);
    this.remember(key, p);
    return p;
  }

  private remember(key: string, p: ModelPoint): void {
    this.cache.set(key, p);
    if (p.phase === 'lamellar') this.ordered.push(p);
  }

  /**
   * Up to three ordered equilibrium points for interpolating in χN: the nearest, then the
   * nearest ones whose separation from those already taken is at least a quarter of the
   * distance to χN (clustered points, as Brent's method leaves them, give no baseline).
   */
  private stencil(chiN: number): ModelPoint[] {
    const eq = this.equilibriumSorted;
    const out: ModelPoint[] = [];
    // Walk outwards from χN in order of distance.
    let right = lowerBound(eq, chiN);
    let left = right - 1;
    for (let seen = 0; out.length < 3 && seen < 200 && (left >= 0 || right < eq.length); seen++) {
      const takeLeft = right >= eq.length || (left >= 0 && chiN - eq[left].chiN <= eq[right].chiN - chiN);
      const p = takeLeft ? eq[left--] : eq[right++];
      if (out.length === 0) {
        out.push(p);
        continue;
      }
      const need = Math.max(0.25 * Math.abs(chiN - out[0].chiN), 1e-6 * chiN);
      if (out.every((q) => Math.abs(q.chiN - p.chiN) >= need)) out.push(p);
    }
    return out;
  }

  /**
   * Fields at χN by linear inter/extrapolation in χN from two stencil points (grid values,
   * i.e. in the scaled coordinate x/L): the first solve then starts a second-order
   * distance from the solution instead of a first-order one.
   */
  private extrapolatedFields(chiN: number): SpeciesArrays | undefined {
    const [a, b] = this.stencil(chiN);
    if (!b) return undefined;
    const t = (chiN - a.chiN) / (b.chiN - a.chiN);
    if (!Number.isFinite(t) || t < -2 || t > 3) return undefined;
    const nx = this.spec.nx;
    const out: SpeciesArrays = { A: new Float64Array(nx), B: new Float64Array(nx) };
    for (const k of ['A', 'B'] as const) for (let j = 0; j < nx; j++) out[k][j] = a.solution.w[k][j] + t * (b.solution.w[k][j] - a.solution.w[k][j]);
    return out;
  }

  /** Predicted stress-free period at χN: Lagrange inter/extrapolation on the stencil. */
  private predictPeriod(chiN: number): { period: number; slope?: number } {
    const st = this.stencil(chiN);
    if (st.length === 0) {
      const s = this.seed?.equilibriumNear(chiN);
      if (s) return { period: s.period * Math.pow(chiN / s.chiN, 0.25) };
      return { period: periodGuess(this.system(chiN), this.chain) };
    }
    const slope = st[0].stressSlope;
    // Lagrange polynomial through the stencil (degree ≤ 2): L_eq(χN) is smooth.
    let L = 0;
    for (let i = 0; i < st.length; i++) {
      let w = 1;
      for (let j = 0; j < st.length; j++) if (j !== i) w *= (chiN - st[j].chiN) / (st[i].chiN - st[j].chiN);
      L += w * st[i].period;
    }
    if (st.length === 1 || !(L > 0)) {
      // A single point: growth like the intermediate-segregation exponent (a guess; the secant corrects it).
      const seeded = this.seed?.equilibriumNear(chiN);
      const seededAtA = this.seed?.equilibriumNear(st[0].chiN);
      if (seeded && seededAtA && Math.abs(seeded.chiN - chiN) < Math.abs(st[0].chiN - chiN)) return { period: st[0].period * (seeded.period / seededAtA.period) * Math.pow(chiN / seeded.chiN, 0.25) / Math.pow(st[0].chiN / seededAtA.chiN, 0.25), slope };
      return { period: st[0].period * Math.pow(chiN / st[0].chiN, 0.25), slope };
    }
    return { period: L, slope };
  }

  /** Nearest ordered equilibrium point in χN (for seeding finer models). */
  equilibriumNear(chiN: number): ModelPoint | undefined {
    return this.stencil(chiN)[0];
  }

  /**
   * The lamella at its stress-free period: the shared stress-free search
   * (spectral/stress-free-search.ts), started from the period and slope predicted by the
   * neighbouring χN already solved, each trial a warm-started, cached fixed-cell solve.
   */
  equilibrium(chiN: number): ModelPoint {
    const hit = this.equilibriumCache.get(chiN);
    if (hit) {
      this.counters.cacheHits++;
      return hit;
    }
    const guess = this.predictPeriod(chiN);
    const first = this.solveOrdered(chiN, guess.period, this.warmStart(chiN, Number.NaN));
    if (first.phase === 'disordered') {
      const p = this.point(chiN, Number.NaN, first);
      this.equilibriumCache.set(chiN, p);
      return p;
    }
    let r;
    try {
      r = findStressFree(
        {
          solveAt: (L, initial) => this.solveOrdered(chiN, L, initial),
          stress: (L, w) => cellStress(this.chain, this.contour, this.cell.withLength(L), w),
        },
        { length: guess.period, solution: first, slope: guess.slope },
        PERIOD_REL_TOL,
      );
    } catch (e) {
      if (e instanceof StressSearchFailure) throw new RunFailure(`equilibrium period at χN = ${chiN}: ${e.message}`);
      throw e;
    }
    const p = this.point(chiN, r.length, r.solution, 0);
    p.stressSlope = r.slope;
    this.equilibriumCache.set(chiN, p);
    this.equilibriumSorted.splice(lowerBound(this.equilibriumSorted, chiN), 0, p);
    this.remember(`${chiN}|${r.length}`, p);
    return p;
  }
}

/** First index i with points[i].chiN >= chiN (points sorted by χN). */
function lowerBound(points: ModelPoint[], chiN: number): number {
  let lo = 0;
  let hi = points.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (points[mid].chiN < chiN) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/**
 * The film model a fit evaluates many times: the film solve (spectral/film-solve.ts) at a
 * state (χN, both wall affinities, thickness), warm-started from the nearest state already
 * solved, so that a fit costs a few short field iterations per step instead of a full solve.
 *
 * Units: thickness and wall range in Rg, affinities in kT per chain × Rg (docs/physics.md,
 * "Films"). The first state is solved by the full film solve (every lamellar start and the
 * disordered film, the lowest free energy wins); every later state starts from the fields of
 * the nearest solved state (on the same number of grid points, so a thickness change maps
 * z/H to z/H). A warm start follows the state it starts from (its layer count), so the fit
 * follows the film's state at the start; `confirm` re-solves a state from scratch to check
 * that it is still the lowest-F state there.
 */
import type { SpectralOptions } from '../../io/schemas/spectral-schema.js';
import type { ChainSpec } from '../../physics/chain-schema.js';
import { FilmCell } from '../../physics/cell/film-cell.js';
import type { ScftSolution } from '../../physics/result.js';
import { solveFilm } from '../../spectral/film-solve.js';
import type { FilmSolveStep } from '../../spectral/film-solve.js';
import type { FilmLayers } from '../../spectral/film-solve.js';
import { countLayers } from '../../spectral/film-solve.js';
import { solveFixedCell } from '../../spectral/scft-solver.js';

export interface FilmState {
  chiN: number;
  /** Affinities of the bottom (substrate) and top wall for A. */
  bottom: number;
  top: number;
  /** Thickness, Rg. */
  thickness: number;
}

export interface FilmModelSpec {
  chain: ChainSpec;
  nx: number;
  ns: number;
  /** Range of the walls' surface field, Rg. */
  wallRange: number;
  solver?: Partial<SpectralOptions>;
}

export interface FilmPoint {
  state: FilmState;
  cell: FilmCell;
  solution: ScftSolution;
  layers: FilmLayers;
}

/** Iterations a warm-started solve may take before the jump is split in two. */
const WARM_ITERATIONS = 400;
/** Halvings of a failed jump before the state is solved from scratch. */
const MAX_HALVINGS = 1;
/** Solved states kept as warm starts (the oldest dropped first). */
const KEEP = 200;

export class FilmModel {
  readonly counters = { solves: 0, fullSolves: 0, iterations: 0, seconds: 0, failed: 0 };
  private readonly points: FilmPoint[] = [];
  private readonly memo = new Map<string, FilmPoint>();
  private readonly unreachable = new Set<string>();

  constructor(readonly spec: FilmModelSpec) {}

  cellOf(s: FilmState): FilmCell {
    return new FilmCell(s.thickness, this.spec.nx, { bottom: { affinity: s.bottom }, top: { affinity: s.top }, range: this.spec.wallRange }, 'cell');
  }

  private system(s: FilmState) {
    return { chain: this.spec.chain, chiN: s.chiN };
  }

  /** The state solved from scratch (the full film solve); `onStep` follows its starts and iterations (progress). */
  confirm(s: FilmState, onStep?: (step: FilmSolveStep) => void): FilmPoint {
    const t0 = performance.now();
    const cell = this.cellOf(s);
    const r = solveFilm({ system: this.system(s), cell, contour: this.spec.ns, options: this.spec.solver, onStep });
    this.counters.fullSolves++;
    this.counters.iterations += r.solution.iterations;
    this.counters.seconds += (performance.now() - t0) / 1000;
    return { state: { ...s }, cell, solution: r.solution, layers: r.layers };
  }

  /**
   * Every distinct layering the full film solve reaches at s (the lowest-F state and the
   * other converged starts), lowest F first; none is kept as a warm start.
   */
  layerings(s: FilmState): FilmPoint[] {
    const t0 = performance.now();
    const cell = this.cellOf(s);
    const r = solveFilm({ system: this.system(s), cell, contour: this.spec.ns, options: this.spec.solver });
    this.counters.fullSolves++;
    this.counters.seconds += (performance.now() - t0) / 1000;
    const seen = new Map<string, FilmPoint>();
    for (const sol of [...r.states].sort((a, b) => a.freeEnergy - b.freeEnergy)) {
      const layers = countLayers(sol.phi);
      if (!seen.has(layers.sequence)) seen.set(layers.sequence, { state: { ...s }, cell, solution: sol, layers });
    }
    return [...seen.values()];
  }

  /** The state s solved from the fields of `from` (not kept); undefined when it does not converge. */
  warmFrom(from: FilmPoint, s: FilmState): FilmPoint | undefined {
    return this.continued(from, s, 0);
  }

  /**
   * A warm start that fails (a far jump in the parameters) is retried through the midpoint
   * between the two states (natural-parameter continuation, common practice, no source), a
   * few halvings deep, so that the fit stays on the layering it follows.
   */
  private continued(from: FilmPoint, s: FilmState, depth: number): FilmPoint | undefined {
    const direct = this.warmOnce(from, s);
    if (direct || depth >= MAX_HALVINGS) return direct;
    const mid: FilmState = { chiN: Math.sqrt(from.state.chiN * s.chiN), bottom: (from.state.bottom + s.bottom) / 2, top: (from.state.top + s.top) / 2, thickness: Math.sqrt(from.state.thickness * s.thickness) };
    const half = this.continued(from, mid, depth + 1);
    return half && this.continued(half, s, depth + 1);
  }

  private warmOnce(from: FilmPoint, s: FilmState): FilmPoint | undefined {
    const t0 = performance.now();
    const cell = this.cellOf(s);
    // Fields scale roughly with χN (w ~ χN φ), so the start is scaled by the χN ratio.
    const k = s.chiN / from.state.chiN;
    const initial = { A: from.solution.w.A.map((v) => v * k), B: from.solution.w.B.map((v) => v * k) };
    // A warm start that needs more than this is a far jump: the midpoint is cheaper (measured: a
    // near start converges in 40–80 iterations).
    const options = { ...this.spec.solver, maxIterations: Math.min(this.spec.solver?.maxIterations ?? WARM_ITERATIONS, WARM_ITERATIONS) };
    const sol = solveFixedCell({ system: this.system(s), cell, contour: this.spec.ns, options, initial });
    this.counters.solves++;
    this.counters.iterations += sol.iterations;
    this.counters.seconds += (performance.now() - t0) / 1000;
    return sol.converged ? { state: { ...s }, cell, solution: sol, layers: countLayers(sol.phi) } : undefined;
  }

  /** Forget every warm start and start again from this one state (a fit follows its layering). */
  restartFrom(point: FilmPoint): void {
    this.points.length = 0;
    this.memo.clear();
    this.unreachable.clear();
    this.keep(point);
  }

  /** The state solved from scratch and kept as a warm start (a fit's start for each pair of wall preferences). */
  confirmAndKeep(s: FilmState): FilmPoint {
    const point = this.confirm(s);
    this.keep(point);
    return point;
  }

  private keep(point: FilmPoint): void {
    const s = point.state;
    this.memo.set(`${s.chiN},${s.bottom},${s.top},${s.thickness}`, point);
    this.points.push(point);
    if (this.points.length > KEEP) {
      const old = this.points.shift()!;
      this.memo.delete(`${old.state.chiN},${old.state.bottom},${old.state.top},${old.state.thickness}`);
    }
  }

  /** The state s, warm-started from the nearest solved one; undefined when that does not converge. */
  at(s: FilmState): FilmPoint | undefined {
    const key = `${s.chiN},${s.bottom},${s.top},${s.thickness}`;
    const hit = this.memo.get(key);
    if (hit) return hit;
    const near = this.nearest(s);
    let point: FilmPoint | undefined;
    if (this.unreachable.has(key)) return undefined;
    if (near) {
      // The followed layering did not converge here (it may cease to exist): no state, rather
      // than a solve from scratch that could jump to another layering.
      point = this.warmFrom(near, s);
      if (!point) {
        this.counters.failed++;
        this.unreachable.add(key);
        return undefined;
      }
    } else point = this.confirm(s);
    this.keep(point);
    return point;
  }

  /** The solved state closest to s (relative in χN and thickness, absolute in the affinities). */
  private nearest(s: FilmState): FilmPoint | undefined {
    let best: FilmPoint | undefined;
    let bestD = Infinity;
    for (const p of this.points) {
      const d = Math.log(p.state.chiN / s.chiN) ** 2 + (p.state.bottom - s.bottom) ** 2 + (p.state.top - s.top) ** 2 + Math.log(p.state.thickness / s.thickness) ** 2;
      if (d < bestD) {
        bestD = d;
        best = p;
      }
    }
    return best;
  }
}

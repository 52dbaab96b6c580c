/**
 * One sweep point: a reference solve through the library (solveFromConfig), reduced to
 * the row the sweep table keeps. Lengths in Rg, free energies in kT per chain
 * (docs/physics.md). The solve depends on the config and the point only, never on what
 * was solved before, so every shard and worker gets the same numbers to the bit.
 */
import type { SweepConfig } from '../io/schemas/sweep-config.js';
import { summarize } from '../io/formats/solution.js';
import { RunFailure } from '../io/errors.js';
import { solveFromConfig } from '../spectral/solve-from-config.js';
import type { SweepPoint } from './grid.js';
import { pointSolveConfig } from './grid.js';

export interface SweepPointResult extends SweepPoint {
  /** A film sweep only: F per area (kT ρ₀Rg/N; null when failed) and the layers from the bottom wall. */
  freeEnergyPerArea?: number | null;
  layers?: string;
  /** "lamellar", "disordered", or "failed" when the solve threw. */
  phase: string;
  /** Equilibrium (or given) period; null when disordered at every trial period or failed. */
  period: number | null;
  periodTolerance: number | null;
  freeEnergy: number | null;
  freeEnergyDisordered: number | null;
  freeEnergyExcess: number | null;
  Q: number | null;
  /** Iterations of the final solve, and over every period trial. */
  iterations: number | null;
  totalIterations: number | null;
  /** Period trials (0 for a fixed period). */
  evaluations: number;
  residual: number | null;
  converged: boolean;
  /** Wall time of the point (the only field that differs between identical runs). */
  seconds: number;
  notes: string[];
}

const finiteOrNull = (v: number | undefined): number | null => (v !== undefined && Number.isFinite(v) ? v : null);

export function solveSweepPoint(config: SweepConfig, point: SweepPoint): SweepPointResult {
  const t0 = performance.now();
  try {
    const { solution, search, film } = solveFromConfig(pointSolveConfig(config, point));
    const s = summarize(solution);
    return {
      ...point,
      ...(point.thickness !== undefined ? { freeEnergyPerArea: film ? finiteOrNull(film.freeEnergyPerArea) : null, layers: film?.layers.sequence ?? '' } : {}),
      phase: s.phase,
      period: search ? finiteOrNull(search.period) : s.period,
      periodTolerance: finiteOrNull(search?.periodTolerance),
      freeEnergy: s.freeEnergy,
      freeEnergyDisordered: s.freeEnergyDisordered,
      freeEnergyExcess: s.freeEnergyExcess,
      Q: s.Q,
      iterations: s.iterations,
      totalIterations: search ? search.totalIterations : s.iterations,
      evaluations: search ? search.evaluations : 0,
      residual: s.residual,
      converged: s.converged,
      seconds: (performance.now() - t0) / 1000,
      notes: s.notes,
    };
  } catch (e) {
    // A point the solver gives up on (a period search that fails: RunFailure) is a result of
    // the sweep, not the end of it: the other points are still worth having. Bad input and
    // bugs (other error classes) still stop it.
    if (!(e instanceof RunFailure)) throw e;
    return {
      ...point,
      ...(point.thickness !== undefined ? { freeEnergyPerArea: null, layers: '' } : {}),
      phase: 'failed',
      period: null,
      periodTolerance: null,
      freeEnergy: null,
      freeEnergyDisordered: null,
      freeEnergyExcess: null,
      Q: null,
      iterations: null,
      totalIterations: null,
      evaluations: 0,
      residual: null,
      converged: false,
      seconds: (performance.now() - t0) / 1000,
      notes: [e.message],
    };
  }
}

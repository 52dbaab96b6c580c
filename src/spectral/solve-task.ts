/**
 * What a `solve` run takes and gives back (spectral/solve-run.ts), as plain data that crosses
 * the worker-thread boundary, and the run's counted phases for its progress. Kept apart from
 * the run so the CLI's main thread can size its progress without loading the solver.
 */
import type { SolveConfig } from '../io/schemas/solve-config.js';

export interface SolveTask {
  config: SolveConfig;
  /** How the user gave the config (its path, or "flags"): model errors name it. */
  source: string;
  /** Starting fields (solver.start of kind "file", read by the caller). */
  initial?: { A: Float64Array; B: Float64Array };
  /** Films: F(H) over this range of thicknesses too. */
  thicknessScan?: { from: number; to: number; points: number };
  /** The files of the output directory are wanted. */
  files: boolean;
  /** stdout as JSON. */
  json: boolean;
}

export interface SolveRunOutput {
  converged: boolean;
  notes: string[];
  /** The one-line end message for the progress line. */
  done: string;
  /** solution.json, profile.csv (and propagators.csv), when asked for. */
  files: Record<string, string> | null;
  stdout: string;
}

/** A counted unit of a phase finished (posted by the worker as plain data); `keep`: a line that stays. */
export interface SolveStep {
  phase: 'period search' | 'thickness scan';
  done: number;
  detail: string;
  keep?: boolean;
}

/** The run's counted phases, for a whole-run time left. */
export function solvePhases(task: Pick<SolveTask, 'config' | 'thicknessScan'>): { name: SolveStep['phase']; units: number; unit: string; estimated?: boolean }[] {
  const { cell } = task.config;
  // The period search takes 4 to 7 evaluations (measured at f = 0.4, χN = 12, 20, 40); a thickness scan then solves its points.
  return [
    { name: 'period search', units: cell.kind === 'periodic' && cell.period === 'equilibrium' ? 7 : 0, unit: 'evaluations', estimated: true },
    { name: 'thickness scan', units: task.thicknessScan && cell.kind === 'film' ? task.thicknessScan.points : 0, unit: 'films' },
  ];
}

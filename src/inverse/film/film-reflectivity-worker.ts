/**
 * Worker-thread entry of `reflectivity` without data (a film's R(Q)): the film solve behind
 * it is seconds to minutes of synchronous work, so on the main thread a Ctrl-C could not be
 * answered (the process died without a word and left its output folder's lock behind); here
 * the main thread stays free and ends the worker at once. Only plain data crosses back.
 */
import { asInputError } from '../../io/errors.js';
import { serveTasks } from '../../threads/task-worker.js';
import { filmReflectivity } from './film-reflectivity.js';
import type { FilmReflectivitySettings } from './film-reflectivity.js';
import type { FilmSolveStep } from '../../spectral/film-solve.js';

/** What `reflectivity` writes, as plain data (a film point's cell and solution stay here). */
export interface ReflectivityCurve {
  phase: string;
  layers: string;
  freeEnergy: number;
  converged: boolean;
  R: Float64Array;
  z: Float64Array;
  sld: Float64Array;
  slices: number;
  seconds: number;
}

/** At most this often a progress step crosses to the main thread (a film iteration takes milliseconds). */
const POST_EVERY_MS = 250;

serveTasks<FilmReflectivitySettings, ReflectivityCurve, FilmSolveStep>((s, progress) => {
  let last = 0;
  let lastStart = 0;
  const onStep = (step: FilmSolveStep) => {
    const now = performance.now();
    // A new start always crosses (its first line), the iterations within one at most every POST_EVERY_MS.
    if (step.start === lastStart && now - last < POST_EVERY_MS) return;
    last = now;
    lastStart = step.start;
    progress(step);
  };
  let r;
  try {
    r = filmReflectivity(s, onStep);
  } catch (e) {
    // A model error is bad input given as flags (exit 2), as it was on the main thread.
    throw asInputError(e, 'flags');
  }
  const sol = r.point.solution;
  return { phase: sol.phase, layers: r.point.layers.sequence, freeEnergy: sol.freeEnergy, converged: sol.converged, R: r.R, z: r.z, sld: r.sld, slices: r.slices, seconds: r.seconds };
});

/**
 * Worker-thread entry of `fit-bragg` and `fit-spacing`: each fit is tens of χN (or χ) values,
 * each a reference solve, all synchronous, so on the main thread a Ctrl-C could not be
 * answered (the process died without a word and left its output folder's lock behind); here
 * the main thread stays free and ends the worker at once. Progress and the result (a plain
 * file object) cross back; a model error comes back as bad input naming `source`.
 */
import { asInputError } from '../io/errors.js';
import type { BraggFitConfig } from '../io/schemas/bragg-fit-config.js';
import type { SpacingFitConfig } from '../io/schemas/spacing-fit-config.js';
import type { BraggFitFile, SpacingFitFile } from '../io/formats/measurement-fits.js';
import { serveTasks } from '../threads/task-worker.js';
import type { BraggRunOptions } from './bragg/run-bragg-fit.js';
import type { Provenance } from '../io/versions.js';

export type MeasurementFitTask =
  | { kind: 'bragg'; path: string; config: BraggFitConfig; options: Omit<BraggRunOptions, 'onEvaluation'>; source: string }
  | { kind: 'spacing'; path: string; config: SpacingFitConfig; options: { provenance: Provenance }; source: string };

/** One evaluation of the fit: its count, the trial value (χN or χ) and its χ². */
export type MeasurementFitStep = [evaluations: number, value: number, chi2: number];

serveTasks<MeasurementFitTask, BraggFitFile | SpacingFitFile, MeasurementFitStep>(async (task, progress) => {
  const onEvaluation = (k: number, v: number, chi2: number) => progress([k, v, chi2]);
  try {
    if (task.kind === 'bragg') {
      const { runBraggFit } = await import('./bragg/run-bragg-fit.js');
      return runBraggFit(task.path, task.config, { ...task.options, onEvaluation });
    }
    const { runSpacingFit } = await import('./run-spacing-fit.js');
    return runSpacingFit(task.path, task.config, { ...task.options, onEvaluation });
  } catch (e) {
    throw asInputError(e, task.source);
  }
});

/**
 * Worker-thread entry of an `invert` run of any method (inverse/invert-run.ts): runs the one
 * task the CLI sends and posts its progress steps and its result back. The χN search and its
 * refits are synchronous (each χN evaluation is a solve), so on the main thread a Ctrl-C could
 * not be answered until they ended; here the main thread stays free and ends the worker (and
 * the network estimator's seed workers it started) at once, in whichever phase it is.
 */
import { serveTasks } from '../threads/task-worker.js';
import { invertRun } from './invert-run.js';
import type { InvertRunOptions, InvertRunResult } from './invert-run.js';
import type { InvertPhaseName } from './invert-task.js';

/** What crosses the thread boundary: the run's options without its callbacks. */
export type InvertTask = Omit<InvertRunOptions, 'onStep' | 'onEstimator'>;

export type InvertStep = { kind: 'step'; phase: InvertPhaseName; done: number; detail: string; keep?: boolean } | { kind: 'estimator'; text: string };

serveTasks<InvertTask, InvertRunResult, InvertStep>((task, progress) =>
  invertRun({
    ...task,
    onStep: (phase, done, detail, keep) => progress({ kind: 'step', phase, done, detail, keep }),
    onEstimator: (text) => progress({ kind: 'estimator', text }),
  }),
);

/**
 * Worker-thread entry of `solve` (spectral/solve-run.ts): runs the one task the CLI sends and
 * posts its progress steps and its output back. The main thread stays free for signals.
 */
import { serveTasks } from '../threads/task-worker.js';
import { solveRun } from './solve-run.js';
import type { SolveRunOutput, SolveStep, SolveTask } from './solve-task.js';

serveTasks<SolveTask, SolveRunOutput, SolveStep>((task, progress) => solveRun(task, progress));

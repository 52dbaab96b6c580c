/**
 * A reference solve on a worker thread (spectral/solve-worker.ts), so that SIGINT/SIGTERM is
 * answered at once: the solve (a period search is seconds to minutes of synchronous work)
 * would otherwise hold the main thread and the signal handler with it. On a stop the worker is
 * ended and `stopped()` says what the caller kept; the exit is then 130 or 143.
 */
import type { SolveRunOutput, SolveStep, SolveTask } from '../spectral/solve-task.js';
import { RunStopped, stopAbortSignal } from '../runtime/stop.js';
import { errorFromWorker } from './worker-errors.js';

export async function solveOnWorker(task: SolveTask, onStep: (s: SolveStep) => void, stopped: () => RunStopped): Promise<SolveRunOutput> {
  const { runInWorkers, PoolStopped } = await import('../threads/worker-pool.js');
  try {
    const [r] = await runInWorkers<SolveTask, SolveRunOutput, SolveStep>([task], { entry: 'spectral/solve-worker.js', workerData: null, workers: 1, onProgress: onStep, toError: errorFromWorker, signal: stopAbortSignal() });
    return r;
  } catch (e) {
    if (e instanceof PoolStopped) throw stopped();
    throw e;
  }
}

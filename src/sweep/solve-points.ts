/**
 * Solve sweep points on K worker threads (threads/worker-pool.ts), or in this thread when
 * K = 1. Each free worker takes the next point, so a slow point does not hold up the others;
 * the order results arrive in varies, their values do not (see solve-point.ts), and each is
 * handed on as it arrives so that the run can save it at once.
 */
import { InputError } from '../io/errors.js';
import type { SweepConfig } from '../io/schemas/sweep-config.js';
import type { SweepPoint } from './grid.js';
import type { SweepPointResult } from './solve-point.js';
import { solveSweepPoint } from './solve-point.js';
import { PoolStopped, runInWorkers } from '../threads/worker-pool.js';
import { stopAbortSignal, stopRequested, yieldToEvents } from '../runtime/stop.js';

/** What a point worker is sent once. */
export interface PointWorkerData {
  config: SweepConfig;
}

function pointError(e: { name: string; message: string }, point: SweepPoint): Error {
  const message = `sweep point ${point.index} (χN = ${point.chiN}, f = ${point.f}, b_A/b_B = ${point.segmentRatio}): ${e.message}`;
  return e.name === 'InputError' || e.name === 'ModelError' ? new InputError(message) : new Error(message);
}

/** Solve the points; a stop (runtime/stop.ts) ends it between points, with the workers terminated (PoolStopped). */
export async function solvePoints(config: SweepConfig, points: SweepPoint[], workers: number, onResult: (r: SweepPointResult) => void): Promise<void> {
  if (workers <= 1 || points.length <= 1) {
    for (const p of points) {
      await yieldToEvents();
      if (stopRequested()) throw new PoolStopped();
      onResult(solveSweepPoint(config, p));
    }
    return;
  }
  const workerData: PointWorkerData = { config };
  await runInWorkers<SweepPoint, SweepPointResult>(points, { entry: 'sweep/point-worker.js', workerData, workers, onResult, toError: pointError, signal: stopAbortSignal() });
}

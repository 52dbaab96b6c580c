/**
 * Worker-thread entry of a sweep: solves the points the parent sends, one at a time,
 * and posts each row back. The config comes once, in workerData.
 */
import { parentPort, workerData } from 'node:worker_threads';
import type { SweepConfig } from '../io/schemas/sweep-config.js';
import type { SweepPoint } from './grid.js';
import { solveSweepPoint } from './solve-point.js';

const config = (workerData as { config: SweepConfig }).config;
parentPort!.on('message', (point: SweepPoint) => {
  try {
    parentPort!.postMessage({ result: solveSweepPoint(config, point) });
  } catch (e) {
    // Error subclasses do not survive the structured clone: send the class name along.
    const err = e as Error;
    parentPort!.postMessage({ error: { name: err?.name ?? 'Error', message: err?.message ?? String(e) } });
  }
});

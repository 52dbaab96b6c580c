/**
 * Solve sweep points on K worker threads (or in this thread when K = 1). Each free worker
 * takes the next point, so a slow point does not hold up the others; the order results
 * arrive in varies, their values do not (see solve-point.ts).
 */
import { Worker } from 'node:worker_threads';
import { InputError } from '../io/errors.js';
import type { SweepConfig } from '../io/schemas/sweep-config.js';
import type { SweepPoint } from './grid.js';
import type { SweepPointResult } from './solve-point.js';
import { solveSweepPoint } from './solve-point.js';


/**
 * The compiled worker entry. Under vitest this module runs from src/*.ts, which a worker
 * thread cannot load; the tests build dist/ first, so take the compiled file from there.
 */
function workerUrl(): URL {
  const here = import.meta.url;
  return here.endsWith('.ts') ? new URL('../../dist/sweep/point-worker.js', here) : new URL('./point-worker.js', here);
}

type WorkerReply = { result: SweepPointResult } | { error: { name: string; message: string } };

function replyError(point: SweepPoint, e: { name: string; message: string }): Error {
  const message = `sweep point ${point.index} (χN = ${point.chiN}, f = ${point.f}, b_A/b_B = ${point.segmentLengthRatio}): ${e.message}`;
  return e.name === 'InputError' || e.name === 'ModelError' ? new InputError(message) : new Error(message);
}

export async function solvePoints(config: SweepConfig, points: SweepPoint[], workers: number, onResult: (r: SweepPointResult) => void): Promise<void> {
  if (workers <= 1 || points.length <= 1) {
    for (const p of points) onResult(solveSweepPoint(config, p));
    return;
  }
  const queue = [...points];
  const pool = Array.from({ length: Math.min(workers, points.length) }, () => new Worker(workerUrl(), { workerData: { config } }));
  try {
    await new Promise<void>((resolve, reject) => {
      let running = 0;
      const feed = (w: Worker, current: { point?: SweepPoint }) => {
        const next = queue.shift();
        current.point = next;
        if (next) {
          running++;
          w.postMessage(next);
        } else if (running === 0) resolve();
      };
      for (const w of pool) {
        const current: { point?: SweepPoint } = {};
        w.on('message', (m: WorkerReply) => {
          running--;
          try {
            if ('error' in m) throw replyError(current.point!, m.error);
            onResult(m.result);
          } catch (e) {
            reject(e);
            return;
          }
          feed(w, current);
        });
        w.on('error', reject);
        w.on('exit', (code) => {
          if (current.point) reject(new Error(`sweep worker stopped (exit code ${code}) while solving point ${current.point.index}`));
        });
        feed(w, current);
      }
    });
  } finally {
    await Promise.all(pool.map((w) => w.terminate()));
  }
}

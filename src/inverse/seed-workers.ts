/**
 * The network estimator's seeds on worker threads, each with its own tfjs instance: the
 * seeds are independent trainings, and two at once use both cores of a small machine
 * (measured for two like-for-like runs: ×1.48 the throughput of one, npm run bench --
 * --step-profile). Each free worker takes the next seed; results come back per seed and are
 * put in seed order by the caller, so the estimate does not depend on the schedule.
 */
import { Worker } from 'node:worker_threads';
import type { ProfileData } from './profile-csv.js';
import { portable } from '../physics/cell/make-cell.js';
import type { Portable } from '../physics/cell/make-cell.js';
import type { ClassicalStart, NetworkEstimate, NetworkEstimatorSettings } from './network-estimator.js';

/** What a seed worker is sent once (no functions: they do not cross threads). */
export interface SeedWorkerData {
  data: ProfileData;
  classical: Omit<ClassicalStart, 'solution'> & { solution: Portable<ClassicalStart['solution']> };
  settings: Omit<NetworkEstimatorSettings, 'onProgress' | 'seeds' | 'workers'>;
}

export type SeedWorkerReply = { progress: [number, number, number, number] } | { estimate: NetworkEstimate } | { error: { name: string; message: string } };

/** The compiled worker entry (under vitest this module runs from src/*.ts: use dist/, which the tests build). */
function workerUrl(): URL {
  const here = import.meta.url;
  return here.endsWith('.ts') ? new URL('../../dist/inverse/seed-worker.js', here) : new URL('./seed-worker.js', here);
}

export async function estimateInSeedWorkers(data: ProfileData, classical: ClassicalStart, s: NetworkEstimatorSettings): Promise<NetworkEstimate[]> {
  const { onProgress, seeds, workers, ...settings } = s;
  const start: SeedWorkerData = {
    data,
    classical: { chiN: classical.chiN, period: classical.period, offset: classical.offset, solution: portable(classical.solution) },
    settings,
  };
  const queue = [...seeds];
  const pool = Array.from({ length: Math.min(workers ?? 1, seeds.length) }, () => new Worker(workerUrl(), { workerData: start }));
  const results: NetworkEstimate[] = [];
  try {
    await new Promise<void>((resolve, reject) => {
      let running = 0;
      const feed = (w: Worker) => {
        const seed = queue.shift();
        if (seed !== undefined) {
          running++;
          w.postMessage(seed);
        } else if (running === 0) resolve();
      };
      for (const w of pool) {
        w.on('message', (m: SeedWorkerReply) => {
          if ('progress' in m) return onProgress?.(...m.progress);
          running--;
          if ('error' in m) return reject(Object.assign(new Error(m.error.message), { name: m.error.name }));
          results.push(m.estimate);
          feed(w);
        });
        w.on('error', reject);
        feed(w);
      }
    });
  } finally {
    await Promise.all(pool.map((w) => w.terminate()));
  }
  return results;
}

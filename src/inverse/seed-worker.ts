/**
 * Worker-thread entry of seed-workers.ts: runs the network estimator for each seed it is
 * sent (one at a time, on this thread's own tfjs backend) and posts progress and the result.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { restored } from '../physics/cell/make-cell.js';
import { estimateNetwork } from './network-estimator.js';
import type { SeedWorkerData, SeedWorkerReply } from './seed-workers.js';

const { data, classical: sent, settings } = workerData as SeedWorkerData;
const classical = { ...sent, solution: restored(sent.solution) };
const post = (m: SeedWorkerReply) => parentPort!.postMessage(m);

parentPort!.on('message', (seed: number) => {
  estimateNetwork(data, classical, { ...settings, seeds: [seed], workers: 1, onProgress: (...p) => post({ progress: p }) }).then(
    (estimate) => post({ estimate }),
    (e: Error) => post({ error: { name: e.name, message: e.message } }),
  );
});

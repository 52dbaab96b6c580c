/**
 * Worker-thread entry of the network estimator's seeds (network-estimator.ts): runs the
 * estimator for each seed it is sent (one at a time, on this thread's own tfjs backend) and
 * posts progress and the result through threads/task-worker.ts.
 */
import { workerData } from 'node:worker_threads';
import { restored } from '../physics/cell/make-cell.js';
import type { ScftSolution } from '../physics/result.js';
import { serveTasks } from '../threads/task-worker.js';
import { estimateNetwork } from './network-estimator.js';
import type { NetworkEstimate, SeedProgress, SeedWorkerData } from './network-estimator.js';

const { data, classical: sent, settings } = workerData as SeedWorkerData;
const classical = { ...sent, solution: restored<ScftSolution>(sent.solution) };

serveTasks<number, NetworkEstimate, SeedProgress>((seed, progress) => estimateNetwork(data, classical, { ...settings, seeds: [seed], workers: 1, onProgress: (...p) => progress(p) }));

/**
 * Worker-thread entry of the network estimator's seeds (network-estimator.ts): runs the
 * estimator for each seed it is sent (one at a time, on this thread's own tfjs backend) and
 * posts progress and the result through threads/task-worker.ts.
 */
import { workerData } from 'node:worker_threads';
import { serveTasks } from '../threads/task-worker.js';
import { estimateNetwork } from './network-estimator.js';
import type { NetworkEstimate, SeedProgress, SeedWorkerData } from './network-estimator.js';

const { data, classical, settings } = workerData as SeedWorkerData;

serveTasks<number, NetworkEstimate, SeedProgress>((seed, progress) => estimateNetwork(data, classical, { ...settings, seeds: [seed], workers: 1, onProgress: (...p) => progress(p) }));

/**
 * Worker-thread entry of the parallel-runs benchmark: one independent like-for-like run
 * (its own tfjs WASM instance, its own seed) of `steps` Adam steps; posts the wall time.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { selectBackend } from '../autodiff/backend.js';
import { likeForLikeProblem } from './like-for-like.js';

const { width, points, steps, seed } = workerData as { width: number; points: number; steps: number; seed: number };
const { tf } = await selectBackend('wasm');
const p = likeForLikeProblem(tf, width, points, seed);
for (let i = 0; i < 3; i++) p.step('fast');
// Start together with the other workers: wait for the parent's go.
parentPort!.postMessage({ ready: true });
await new Promise((resolve) => parentPort!.once('message', resolve));
const t0 = performance.now();
let loss = 0;
for (let i = 0; i < steps; i++) loss = p.step('fast');
parentPort!.postMessage({ ms: performance.now() - t0, loss });
p.dispose();

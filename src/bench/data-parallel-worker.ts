/**
 * Worker-thread entry of the data-parallel bench (data-parallel.ts): one share of the
 * like-for-like problem's points on its own tfjs WASM instance. Every step it computes its
 * share's loss and gradients, publishes them in shared memory, waits for the other shares
 * (a barrier), sums all shares in share order — so every worker gets the same sum — and
 * applies the same Adam update: the workers' networks stay identical.
 */
import { parentPort, workerData } from 'node:worker_threads';
import type * as TfModule from '@tensorflow/tfjs';
import { selectBackend } from '../autodiff/backend.js';
import { likeForLikeProblem } from './like-for-like.js';

interface Job {
  width: number;
  points: number;
  steps: number;
  seed: number;
  index: number;
  count: number;
  /** [count][2 parities][parameters + 1 loss] float32 slots. */
  slots: SharedArrayBuffer;
  /** Int32 [arrived, generation]. */
  barrier: SharedArrayBuffer;
}

const job = workerData as Job;
const { tf } = await selectBackend('wasm');
const p = likeForLikeProblem(tf, job.width, job.points, job.seed, { index: job.index, count: job.count });
const vars = p.params.variables();
const size = vars.reduce((a, v) => a + v.size, 0);
const slot = (share: number, parity: number) => new Float32Array(job.slots, 4 * (size + 1) * (2 * share + parity), size + 1);
const ctl = new Int32Array(job.barrier);

/** Sense-reversing barrier over `count` workers (Atomics.wait on the generation word). */
function barrier(): void {
  const generation = Atomics.load(ctl, 1);
  if (Atomics.add(ctl, 0, 1) === job.count - 1) {
    Atomics.store(ctl, 0, 0);
    Atomics.add(ctl, 1, 1);
    Atomics.notify(ctl, 1);
  } else {
    while (Atomics.load(ctl, 1) === generation) Atomics.wait(ctl, 1, generation);
  }
}

function step(t: number): number {
  return tf.tidy(() => {
    const parity = t & 1;
    const { value, grads } = tf.variableGrads(() => p.loss('fast'), vars);
    const mine = slot(job.index, parity);
    let o = 0;
    for (const v of vars) {
      // A parameter the loss does not reach (the output bias: only derivatives enter) has no gradient.
      const g = grads[v.name];
      if (g) mine.set(g.dataSync() as Float32Array, o);
      else mine.fill(0, o, o + v.size);
      o += v.size;
    }
    mine[size] = value.dataSync()[0];
    // Slots alternate by step parity: a worker writes parity t again only after every
    // worker has passed step t + 1's barrier, i.e. finished reading step t.
    barrier();
    const summed: TfModule.NamedTensorMap = {};
    const total = new Float32Array(size + 1);
    for (let k = 0; k < job.count; k++) {
      const s = slot(k, parity);
      for (let i = 0; i <= size; i++) total[i] += s[i];
    }
    o = 0;
    for (const v of vars) {
      summed[v.name] = tf.tensor(total.subarray(o, o + v.size), v.shape);
      o += v.size;
    }
    p.applyGradients(summed);
    return total[size];
  });
}

const losses: number[] = [];
for (let t = 0; t < 3; t++) losses.push(step(t));
parentPort!.postMessage({ ready: true });
await new Promise((resolve) => parentPort!.once('message', resolve));
const t0 = performance.now();
for (let t = 3; t < 3 + job.steps; t++) losses.push(step(t));
parentPort!.postMessage({ ms: performance.now() - t0, losses });
p.dispose();

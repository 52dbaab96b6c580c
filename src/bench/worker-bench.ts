/**
 * Do independent runs (seeds of an ensemble, sweep points) gain from running two at once in
 * worker threads? Each worker runs its own like-for-like run (src/bench/like-for-like.ts)
 * on its own tfjs WASM instance; the figure is the throughput in steps per second of the
 * whole machine, one run alone against two at once. On a shared machine the second core
 * is only partly free: the bench prints the load average with the result.
 */
import { loadavg } from 'node:os';
import { Worker } from 'node:worker_threads';
import { median } from './timing.js';

/**
 * Start one worker per entry of `data` on `script` (a sibling module), wait until every one
 * has set up and posted once, then let them all go at the same time; resolves with each
 * worker's second message.
 */
export async function runWorkersTogether<T>(script: string, data: object[]): Promise<T[]> {
  const workers = data.map((workerData) => new Worker(new URL(script, import.meta.url), { workerData }));
  const next = (w: Worker) =>
    new Promise<T>((resolve, reject) => {
      w.once('message', resolve);
      w.once('error', reject);
    });
  await Promise.all(workers.map(next));
  const done = workers.map(next);
  for (const w of workers) w.postMessage('go');
  const out = await Promise.all(done);
  await Promise.all(workers.map((w) => w.terminate()));
  return out;
}

/** One worker per seed, each an independent run. */
function runWorkers(width: number, points: number, steps: number, seeds: number[]): Promise<Array<{ ms: number; loss: number }>> {
  return runWorkersTogether('./worker-steps.js', seeds.map((seed) => ({ width, points, steps, seed })));
}

export async function runWorkerBench(opts: { width?: number; points?: number; steps?: number; rounds?: number } = {}): Promise<void> {
  const width = opts.width ?? 32;
  const points = opts.points ?? 2048;
  const steps = opts.steps ?? 100;
  const rounds = opts.rounds ?? 3;
  console.log(`\nindependent runs in worker threads (like-for-like H = ${width}, ${points} points, ${steps} steps per run; load average ${loadavg().map((l) => l.toFixed(1)).join(' ')})`);
  const alone: number[] = [];
  const pair: number[] = [];
  for (let r = 0; r < rounds; r++) {
    const [one] = await runWorkers(width, points, steps, [1]);
    alone.push((1000 * steps) / one.ms);
    const two = await runWorkers(width, points, steps, [1, 2]);
    // Throughput of the pair: both runs' steps over the slower run's stepping time.
    pair.push((1000 * 2 * steps) / Math.max(...two.map((x) => x.ms)));
  }
  const a = median(alone);
  const b = median(pair);
  console.log(`  one run alone: ${a.toFixed(1)} steps/s [${alone.map((x) => x.toFixed(1)).join(', ')}]; two runs at once: ${b.toFixed(1)} steps/s in total [${pair.map((x) => x.toFixed(1)).join(', ')}] (×${(b / a).toFixed(2)})`);
}

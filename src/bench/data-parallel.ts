/**
 * Does one run gain from being split across the two cores? The like-for-like step
 * (like-for-like.ts) with its points split into equal shares, one worker thread (and tfjs
 * WASM instance) per share, gradients summed every step through shared memory
 * (data-parallel-worker.ts), against the same harness with one share. Also reports the
 * losses of both, which must agree to float32 rounding (the sum's order differs).
 */
import { loadavg } from 'node:os';
import { likeForLikeParameterCount } from './like-for-like.js';
import { median } from './timing.js';
import { runWorkersTogether } from './worker-bench.js';

export interface SplitRun {
  msPerStep: number;
  losses: number[];
}

/** `count` workers, one share each, `steps` timed steps after 3 untimed ones. */
export async function runSplit(width: number, points: number, steps: number, count: number, seed = 1): Promise<SplitRun> {
  const size = likeForLikeParameterCount(width);
  const slots = new SharedArrayBuffer(4 * (size + 1) * 2 * count);
  const barrier = new SharedArrayBuffer(8);
  const out = await runWorkersTogether<{ ms: number; losses: number[] }>(
    './data-parallel-worker.js',
    Array.from({ length: count }, (_, index) => ({ width, points, steps, seed, index, count, slots, barrier })),
  );
  return { msPerStep: Math.max(...out.map((o) => o.ms)) / steps, losses: out[0].losses };
}

export async function runDataParallelBench(opts: { steps?: number; rounds?: number } = {}): Promise<void> {
  const rounds = opts.rounds ?? 3;
  console.log(`\none run split across worker threads (like-for-like step, points split in equal shares, gradients summed every step; load average ${loadavg().map((l) => l.toFixed(1)).join(' ')})`);
  for (const [width, points] of [
    [32, 2048],
    [64, 4096],
  ]) {
    const steps = opts.steps ?? (width === 32 ? 100 : 30);
    const one: number[] = [];
    const two: number[] = [];
    let agree = 0;
    for (let r = 0; r < rounds; r++) {
      const a = await runSplit(width, points, steps, 1);
      const b = await runSplit(width, points, steps, 2);
      one.push(a.msPerStep);
      two.push(b.msPerStep);
      agree = Math.max(agree, ...a.losses.map((l, i) => Math.abs(l - b.losses[i]) / Math.abs(l)));
    }
    const [m1, m2] = [median(one), median(two)];
    console.log(
      `  H = ${width}, ${points} points: one worker ${m1.toFixed(1)} ms/step [${one.map((x) => x.toFixed(1)).join(', ')}], two workers ${m2.toFixed(1)} ms/step [${two.map((x) => x.toFixed(1)).join(', ')}] (×${(m1 / m2).toFixed(2)}); losses agree to ${agree.toExponential(1)} relative over ${steps + 3} steps`,
    );
  }
}

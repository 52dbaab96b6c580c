/** Timing helpers of the benchmarks: medians after a warm-up (robust to a shared machine's spikes). */

import { median } from '../numerics/median.js';

export { median };

/** Median ms of `repeats` calls of fn after `warmup` untimed ones. */
export function timeIt(fn: () => void, repeats: number, warmup = 1): number {
  for (let i = 0; i < warmup; i++) fn();
  const t: number[] = [];
  for (let i = 0; i < repeats; i++) {
    const t0 = performance.now();
    fn();
    t.push(performance.now() - t0);
  }
  return median(t);
}

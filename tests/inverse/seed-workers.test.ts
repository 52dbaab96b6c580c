import { describe, expect, it } from 'vitest';
import { estimateNetwork } from '../../src/inverse/network-estimator.js';
import { diblock, invert, synthData } from './helpers.js';

// The seeds of the network estimator are independent, deterministic trainings, so running
// them on worker threads (threads/worker-pool.ts, inverse/seed-worker.ts) must give the same
// runs as one after the other in this thread (common practice, no source). A short budget: this checks the plumbing,
// not the accuracy (tests/inverse/network*.test.ts do that).
describe('network estimator seeds on worker threads', () => {
  it('two workers give the same runs, in seed order, as this thread alone', async () => {
    const chain = diblock(0.5);
    const { data } = synthData({ chain, chiN: 15, nx: 32, ns: 60, noise: 0.02, seed: 9 });
    const cl = invert(data, { chain, nx: 32, ns: 60 });
    // 12 Adam steps with one field/χN update (at step 10) after a 10-step warm start: each seed's
    // cost is mostly its per-seed set-up and the 150-step field refit of each update.
    const settings = { chain, strategy: 'adam-lbfgs' as const, seeds: [2, 1, 3], steps: 12, fieldUpdateEvery: 10, lbfgsIterations: 0, warmStartSteps: 10, resolution: 0, backend: 'wasm' as const };
    const progress: number[] = [];
    const threads = await estimateNetwork(data, cl, { ...settings, workers: 2, onProgress: (seed) => progress.push(seed) });
    const here = await estimateNetwork(data, cl, { ...settings, workers: 1 });
    expect(threads.runs.map((r) => r.seed)).toEqual([1, 2, 3]);
    expect(here.runs.map((r) => r.seed)).toEqual([2, 1, 3]);
    for (const r of threads.runs) {
      // The field/χN update ran (start, then step 10): the runs compared are past it.
      expect(r.trajectory.map((p) => p.step)).toEqual([0, 10]);
      const same = here.runs.find((h) => h.seed === r.seed)!;
      expect(r.chiN).toBe(same.chiN);
      expect(Array.from(r.exchange)).toEqual(Array.from(same.exchange));
    }
    expect(threads.chiN).toBeCloseTo(here.chiN, 12);
    expect(threads.backend).toBe('wasm');
    // Progress crosses the thread boundary for every seed.
    expect(new Set(progress)).toEqual(new Set([1, 2, 3]));
  });
});

import { defineConfig } from 'vitest/config';
import { LongestFirstSequencer } from './tests/longest-first-sequencer.js';

export default defineConfig({
  test: {
    include: ['tests/**/*.test.ts'],
    globalSetup: ['tests/global-setup.ts'],
    testTimeout: 300_000,
    hookTimeout: 120_000,
    // Two cores: one worker per core keeps CPU-bound tests from starving each other.
    maxWorkers: 2,
    // One module registry per worker, not one per file: each file no longer pays for a fresh
    // fork and for importing vitest, zod, tfjs and our modules again. Measured on 25 small
    // files: CPU 30.4 s → 16.5 s (and 29.4 s → 16.1 s in the other order). Test files must
    // therefore not leave state behind (process listeners, env, module-level caches they
    // mutate): the whole suite passes this way in the longest-first order.
    isolate: false,
    // Longest files first, also on a fresh clone without vitest's timings (see the sequencer).
    sequence: { sequencer: LongestFirstSequencer },
  },
});

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
    // Longest files first, also on a fresh clone without vitest's timings (see the sequencer).
    sequence: { sequencer: LongestFirstSequencer },
  },
});

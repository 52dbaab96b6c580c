import { defineConfig } from 'vitest/config';
import { LongestFirstSequencer } from '/work/main/tests/longest-first-sequencer.js';
export default defineConfig({
  test: {
    include: ['tests/**/*.test.ts'],
    globalSetup: ['tests/global-setup.ts'],
    testTimeout: 300_000, hookTimeout: 120_000, maxWorkers: 2, isolate: false,
    sequence: { sequencer: LongestFirstSequencer },
  },
});

/**
 * Configs shared by the trainer's test files (the trainer tests are split over several files
 * so that the test runner can run them side by side).
 */
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { trainConfigSchema } from '../../src/io/schemas/train-config.js';
import type { TrainConfigInput } from '../../src/io/schemas/train-config.js';

export const tmp = () => mkdtempSync(join(tmpdir(), 'mesofield-train-'));
export const cfg = (c: Omit<TrainConfigInput, 'version' | 'kind'>) => trainConfigSchema.parse({ version: 2, kind: 'train', ...c });

/** A homopolymer in a fixed cosine field: a single-chain problem. */
export const fieldSystem = {
  chain: { type: 'homopolymer' as const, species: 'A' as const },
  externalField: { A: { type: 'cosine' as const, amplitude: 2, mode: 1, offset: 0 } },
};

/**
 * The symmetric diblock at χN = 15 with a warm start from the spectral reference. 64 contour
 * steps, not 100: the warm start fits ln q at every reference contour point up to 64 steps
 * (network/warm-start.ts: every k-th with k = ⌊ns/64⌋, so 100 steps give 101 rows, 64 give 65),
 * and its cost is in those points; the reference itself moves by the contour error (fourth
 * order, ~1e-5). Measured with 64 (trainer.test.ts): φA 9.5e-3, w_A − w_B 1.8e-2, F 4.1e-3 kT,
 * as with 100 (9.6e-3, 1.8e-2, 4.2e-3).
 */
export const symmetricDiblock = cfg({
  system: { chain: { type: 'diblock', f: 0.5 }, chiN: 15 },
  cell: { period: 'equilibrium', nx: 64, ns: 64 },
  warmStart: { type: 'reference', adamSteps: 400, learningRate: 0.01 },
  training: { adamSteps: 300, learningRate: 1e-3, checkpointEvery: 100 },
});

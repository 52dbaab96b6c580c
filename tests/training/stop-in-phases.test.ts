/**
 * A stop asked while the L-BFGS polish or the second-order (Levenberg–Marquardt) phase runs
 * lands after the current iteration, not at the end of the phase: the stop is asked from an
 * event, as a signal handler asks it, so it can only be seen if the phase lets the event loop
 * turn between iterations (before, each phase was one synchronous loop and ran to its end).
 * The stop goes through requestStop, the signal handler's own code path.
 */
import { afterEach, describe, expect, it } from 'vitest';
import { trainConfigSchema } from '../../src/io/schemas/train-config.js';
import { requestStop, resetStop, stopRequested } from '../../src/runtime/stop.js';
import { trainRun, TrainingStopped } from '../../src/training/train-run.js';

/** Ask for a stop two event-loop turns from now: after the phase has started its first iteration. */
const stopSoon = () => setImmediate(() => setImmediate(() => requestStop('SIGINT')));

afterEach(() => resetStop());

/** A symmetric diblock at χN = 15 in a fixed cell, tiny networks on a coarse grid: a run of seconds. */
const SMALL_DIBLOCK = {
  version: 2,
  kind: 'train',
  system: { chain: { type: 'diblock', f: 0.5 }, chiN: 15 },
  cell: { period: 3.7, nx: 32, ns: 40 },
  backend: 'wasm',
  networks: { field: { hidden: [8] }, propagator: { hidden: [8, 8] } },
  collocation: { nx: 16, nodesPerBlock: 8, random: 0 },
};

/** A chain in a cosine field from a cold start, tiny networks: a second-order phase of seconds. */
const CHAIN_IN_A_FIELD = {
  version: 2,
  kind: 'train',
  system: { chain: { type: 'homopolymer', species: 'A' }, externalField: { A: { type: 'cosine', amplitude: 2.0, mode: 1, offset: 0 } } },
  cell: { period: 4.0, nx: 32, ns: 40 },
  networks: { propagator: { hidden: [8, 8], fourierModes: 3 } },
  collocation: { nx: 16, nodesPerBlock: 16, random: 0 },
  warmStart: { type: 'none' },
};

describe('a stop inside an optimisation phase', () => {
  it('L-BFGS polish: stops within an iteration of the request, saved as a stop between cycles', async () => {
    const config = trainConfigSchema.parse({ ...SMALL_DIBLOCK, warmStart: { type: 'reference', adamSteps: 5 }, training: { adamSteps: 5, lbfgsIterations: 300, lbfgsCycles: 1, evaluateEvery: 0 } });
    resetStop();
    const e = await trainRun({ config, backend: 'wasm', shouldStop: stopRequested, onStage: (m) => void (/^L-BFGS polish/.test(m) && stopSoon()) }).catch((x) => x);
    expect(e).toBeInstanceOf(TrainingStopped);
    const m = /interrupted in the L-BFGS polish after (\d+) iterations \(cycle 1 of 1\)/.exec((e as Error).message);
    expect(m, (e as Error).message).not.toBeNull();
    const done = Number(m![1]);
    expect(done).toBeGreaterThanOrEqual(1);
    expect(done).toBeLessThanOrEqual(3);
  }, 120_000);

  it('second-order phase: stops within an LM iteration of the request', async () => {
    const config = trainConfigSchema.parse({ ...CHAIN_IN_A_FIELD, training: { adamSteps: 0, evaluateEvery: 0, secondOrderIterations: 40 } });
    resetStop();
    const e = await trainRun({ config, backend: 'wasm', shouldStop: stopRequested, onStage: (m) => void (/^second-order phase/.test(m) && stopSoon()) }).catch((x) => x);
    expect(e).toBeInstanceOf(TrainingStopped);
    const m = /interrupted in the second-order phase at iteration (\d+)/.exec((e as Error).message);
    expect(m, (e as Error).message).not.toBeNull();
    expect(Number(m![1])).toBeGreaterThanOrEqual(1);
    expect(Number(m![1])).toBeLessThanOrEqual(3);
  }, 120_000);

  it('second-order phase, in the output-layer LM before a propagator iteration: stops there, at iteration 0', async () => {
    // 1000 output-layer iterations (secondOrder.outputLayerIterations) come before the first
    // propagator iteration: a stop that waited for the propagators' LM would report iteration 1
    // after all of them.
    const config = trainConfigSchema.parse({ ...CHAIN_IN_A_FIELD, training: { adamSteps: 0, evaluateEvery: 0, secondOrderIterations: 40, secondOrder: { outputLayerIterations: 1000 } } });
    resetStop();
    const e = await trainRun({ config, backend: 'wasm', shouldStop: stopRequested, onStage: (m) => void (/^second-order phase/.test(m) && stopSoon()) }).catch((x) => x);
    expect(e).toBeInstanceOf(TrainingStopped);
    expect((e as Error).message).toMatch(/interrupted in the second-order phase at iteration 0\b/);
  }, 120_000);
});

describe('a stop in the warm start', () => {
  it('stops within a step of the request; nothing to resume, and it says so', async () => {
    const config = trainConfigSchema.parse({ ...SMALL_DIBLOCK, warmStart: { type: 'reference', adamSteps: 5000 }, training: { adamSteps: 5, lbfgsIterations: 0, evaluateEvery: 0 } });
    resetStop();
    const e = await trainRun({ config, backend: 'wasm', shouldStop: stopRequested, onStage: (m) => void (/^warm start/.test(m) && stopSoon()) }).catch((x) => x);
    expect(e).toBeInstanceOf(TrainingStopped);
    const m = /interrupted in the warm start at step (\d+) of 5000, before the first checkpoint; nothing to resume/.exec((e as Error).message);
    expect(m, (e as Error).message).not.toBeNull();
    expect(Number(m![1])).toBeLessThanOrEqual(3);
  }, 120_000);
});

/**
 * The stall rule of the second-order phase's alternating strategy (training/second-order-phase.ts,
 * settings.stallRatio): a propagator's solve in a cycle ends once its MDE cost has fallen by
 * less than the given factor over its last 5 iterations, and the later cycles share the
 * iterations it left. Control logic only (no physics claim): with a ratio so small that every
 * cost "stalls", each solve ends after 5 + 1 iterations; with the rule off it runs its share.
 * Common practice, no source.
 */
import { describe, expect, it } from 'vitest';
import { selectBackend } from '../../src/autodiff/backend.js';
import { trainConfigSchema } from '../../src/io/schemas/train-config.js';
import { buildChain } from '../../src/physics/chain.js';
import { buildScftNetworks } from '../../src/network/scft-networks.js';
import { runSecondOrder } from '../../src/training/second-order-phase.js';

async function run(stallRatio: number) {
  const config = trainConfigSchema.parse({
    version: 2,
    kind: 'train',
    system: { chain: { type: 'diblock', f: 0.5 }, chiN: 12 },
    cell: { period: 4, nx: 32, ns: 40 },
    networks: { field: { hidden: [], fourierModes: 4 }, propagator: { hidden: [6, 6] } },
  });
  const { tf } = await selectBackend('wasm');
  const nets = buildScftNetworks(tf, config, buildChain(config.system.chain), 4, true);
  const so = await runSecondOrder(
    nets,
    config.system,
    config.losses.weights,
    { iterations: 40, nx: 16, nodesPerBlock: 8, damping: 'marquardt', evaluateEvery: 0, lossTolerance: 0, strategy: 'alternating', cycles: 3, firstCycleIterations: 12, jointIterations: 0, fieldMixing: 0.5, fieldStep: 'simple', andersonHistory: 1, periods: 1, stallRatio },
    {},
  );
  nets.dispose();
  return so;
}

describe('the stall rule of the alternating strategy', () => {
  it('ends each solve after 6 iterations when every cost counts as stalled, and not at all when off', async () => {
    const off = await run(0);
    // Off: 12 per propagator in the first cycle, then the 16 left in two cycles of 4 per propagator.
    expect(off.fieldSteps.map((s) => s.afterIteration)).toEqual([24, 32]);
    expect(off.iterations).toBe(40);
    const all = await run(1e-300);
    // Every solve stops at its 6th iteration: 12 before the first field step; the cycles after it
    // are given ⌈(40 − 12) / (2 · 2)⌉ = 7 and ⌈(40 − 24) / 2⌉ = 8 per propagator, and use 6.
    expect(all.fieldSteps.map((s) => s.afterIteration)).toEqual([12, 24]);
    expect(all.iterations).toBe(36);
  }, 60_000);
});

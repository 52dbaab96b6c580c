/**
 * secondOrder.firstCyclePlateau (training/second-order-phase.ts): in the alternating strategy's
 * first cycle, a propagator's LM ends once its loss fell by less than the given fraction over its
 * last 5 iterations, and the later cycles get the iterations saved. Wiring only (the effect on
 * accuracy is measured in docs/second-order-training.md). Common practice, no source.
 */
import { describe, expect, it } from 'vitest';
import { selectBackend } from '../../src/autodiff/backend.js';
import { trainConfigSchema } from '../../src/io/schemas/train-config.js';
import { buildChain } from '../../src/physics/chain.js';
import { buildScftNetworks } from '../../src/network/scft-networks.js';
import { runSecondOrder } from '../../src/training/second-order-phase.js';

async function run(firstCyclePlateau: number | undefined) {
  const config = trainConfigSchema.parse({
    version: 2,
    kind: 'train',
    system: { chain: { type: 'diblock', f: 0.4 }, chiN: 12 },
    cell: { period: 4, nx: 32, ns: 40 },
    networks: { field: { hidden: [], fourierModes: 4 }, propagator: { hidden: [6, 6] } },
  });
  const { tf } = await selectBackend('wasm');
  const nets = buildScftNetworks(tf, config, buildChain(config.system.chain), 4, true);
  const so = await runSecondOrder(
    nets,
    config.system,
    config.losses.weights,
    {
      iterations: 40,
      nx: 16,
      nodesPerBlock: 8,
      damping: 'marquardt',
      evaluateEvery: 0,
      lossTolerance: 0,
      strategy: 'alternating',
      cycles: 3,
      firstCycleIterations: 15,
      jointIterations: 0,
      fieldMixing: 0.5,
      fieldStep: 'simple',
      andersonHistory: 1,
      periods: 1,
      ...(firstCyclePlateau !== undefined ? { firstCyclePlateau } : {}),
    },
    {},
  );
  nets.dispose();
  return so;
}

describe('the first cycle ends where a propagator’s loss stops falling', () => {
  it('0 is no setting; a plateau that every step meets ends each propagator’s first cycle after 6 iterations, and the later cycles use the rest', async () => {
    const none = await run(undefined);
    const zero = await run(0);
    expect(zero.fieldSteps.map((s) => s.afterIteration)).toEqual(none.fieldSteps.map((s) => s.afterIteration));
    expect(none.fieldSteps[0].afterIteration).toBe(30);
    expect(zero.loss).toBe(none.loss);
    // A fall of less than all but 1e-9 of the loss in 5 iterations ends the part after its 6th.
    const early = await run(1 - 1e-9);
    expect(early.fieldSteps[0].afterIteration).toBe(12);
    expect(early.iterations).toBe(40);
    // 28 iterations left over 2 cycles of 2 propagators: 7 each, so the second field step comes after 26.
    expect(early.fieldSteps[1].afterIteration).toBe(26);
  }, 60_000);
});

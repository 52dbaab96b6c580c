/**
 * secondOrder.firstCyclePlateau (training/second-order-phase.ts): in the alternating strategy's
 * first cycle, a propagator's LM ends once its loss fell by less than the given fraction over its
 * last 5 iterations, and the later cycles get the iterations saved. Wiring only (the effect on
 * accuracy is measured in docs/second-order-training.md). Common practice, no source.
 */
import { describe, expect, it } from 'vitest';
import { smallAlternatingRun } from '../helpers/small-diblock-networks.js';

const run = (firstCyclePlateau: number | undefined) => smallAlternatingRun(0.4, { iterations: 28, cycles: 3, firstCycleIterations: 10, ...(firstCyclePlateau !== undefined ? { firstCyclePlateau } : {}) });

describe('the first cycle ends where a propagator’s loss stops falling', () => {
  it('0 is no setting; a plateau that every step meets ends each propagator’s first cycle after 6 iterations, and the later cycles use the rest', async () => {
    const none = await run(undefined);
    const zero = await run(0);
    expect(zero.fieldSteps.map((s) => s.afterIteration)).toEqual(none.fieldSteps.map((s) => s.afterIteration));
    expect(none.fieldSteps[0].afterIteration).toBe(20);
    expect(zero.loss).toBe(none.loss);
    // A fall of less than all but 1e-9 of the loss in 5 iterations ends the part after its 6th.
    const early = await run(1 - 1e-9);
    expect(early.fieldSteps[0].afterIteration).toBe(12);
    expect(early.iterations).toBe(28);
    // 16 iterations left over 2 cycles of 2 propagators: 4 each, so the second field step comes after 20.
    expect(early.fieldSteps[1].afterIteration).toBe(20);
  }, 60_000);
});

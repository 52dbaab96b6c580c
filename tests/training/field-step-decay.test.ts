/**
 * secondOrder.fieldStepDecay (training/second-order-phase.ts): the k-th field step of the
 * alternating strategy moves the fields by decay^(k−1) of the move its rule asks for. Wiring
 * only (the effect on accuracy is measured in docs/second-order-training.md): the first step
 * is the rule's whole move whatever the decay, and a decay of 1e-6 leaves the later steps'
 * moves (max |target − w|, the field steps' `move`) at a tiny fraction of the undecayed run's.
 * Decreasing step sizes of a fixed-point iteration with noisy evaluations: Robbins & Monro,
 * Ann. Math. Stat. 22 (1951) 400–407.
 */
import { describe, expect, it } from 'vitest';
import { smallAlternatingRun } from '../helpers/small-diblock-networks.js';

const run = (fieldStepDecay: number | undefined) => smallAlternatingRun(0.4, { iterations: 24, cycles: 4, ...(fieldStepDecay !== undefined ? { fieldStepDecay } : {}) });

describe('field steps that shrink', () => {
  it('1 is no setting; the first step is whole; with 1e-6 the later steps barely move the fields', async () => {
    const none = await run(undefined);
    const one = await run(1);
    expect(one.loss).toBe(none.loss);
    expect(one.fieldSteps.map((s) => s.move)).toEqual(none.fieldSteps.map((s) => s.move));
    const tiny = await run(1e-6);
    expect(tiny.fieldSteps).toHaveLength(3);
    expect(tiny.fieldSteps[0].move).toBe(none.fieldSteps[0].move);
    for (const k of [1, 2]) {
      // Untrained networks: the undecayed steps move the fields by a sizeable amount.
      expect(none.fieldSteps[k].move).toBeGreaterThan(1e-2);
      expect(tiny.fieldSteps[k].move).toBeLessThan(1e-4 * none.fieldSteps[k].move);
    }
  }, 60_000);
});

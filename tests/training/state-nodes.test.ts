/**
 * secondOrder.stateNodesPerBlock (training/second-order-phase.ts): the φ that the field steps of
 * the alternating strategy read is taken on that many contour steps per block. Wiring only (no
 * physics claim; the effect on accuracy is measured in docs/second-order-training.md): the
 * collocation's own count gives the run without the setting to the last digit, and a finer
 * count changes the SCFT deviation the first field step sees. Common practice, no source.
 */
import { describe, expect, it } from 'vitest';
import { smallAlternatingRun } from '../helpers/small-diblock-networks.js';

async function firstDeviation(stateNodesPerBlock: number | undefined) {
  const so = await smallAlternatingRun(0.5, stateNodesPerBlock !== undefined ? { stateNodesPerBlock } : {});
  expect(so.fieldSteps.length).toBe(1);
  return so.fieldSteps[0].residual;
}

describe('the contour steps of the field steps’ φ', () => {
  it('the collocation count equals no setting; a finer count changes the first field step’s deviation', async () => {
    const none = await firstDeviation(undefined);
    expect(await firstDeviation(8)).toBe(none);
    const finer = await firstDeviation(32);
    expect(Number.isFinite(finer)).toBe(true);
    expect(Math.abs(finer - none)).toBeGreaterThan(1e-9 * Math.abs(none));
  }, 60_000);
});

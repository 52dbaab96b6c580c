/**
 * The field step of the second-order phase's alternating strategy (training/second-order-phase.ts):
 * Anderson mixing over the cycles' fields and SCFT deviations, against simple mixing w + λd
 * (the earlier step), with a field network linear in its Fourier features (refitted exactly).
 * The networks start from the spectral solution at χN = 14 and are trained for χN = 15 in
 * the same cell (a continuation step), so the outer SCFT iteration has work to do. Both runs
 * use the same networks, grid, λ and LM iterations. The check is against the spectral
 * reference at χN = 15 (an independent method: pseudo-spectral MDE with Richardson
 * extrapolation and its own Anderson-mixed iteration).
 */
import { describe, expect, it } from 'vitest';
import { selectBackend } from '../../src/autodiff/backend.js';
import { trainConfigSchema } from '../../src/io/schemas/train-config.js';
import { buildChain } from '../../src/physics/chain.js';
import { solveFromConfig } from '../../src/spectral/solve-from-config.js';
import { buildScftNetworks } from '../../src/network/scft-networks.js';
import { warmStart } from '../../src/network/warm-start.js';
import { runSecondOrder } from '../../src/training/second-order-phase.js';
import { evaluateNetworks } from '../../src/training/train-run.js';

/** The spectral solutions and the warm-started parameters, computed once for both runs (deterministic). */
async function setup() {
  const config = trainConfigSchema.parse({
    version: 2,
    kind: 'train',
    system: { chain: { type: 'diblock', f: 0.5 }, chiN: 15 },
    cell: { period: 'equilibrium', nx: 32, ns: 60 },
    networks: { field: { hidden: [], fourierModes: 8 }, propagator: { hidden: [12, 12] } },
  });
  const { tf } = await selectBackend('wasm');
  const chain = buildChain(config.system.chain);
  const reference = solveFromConfig({ system: config.system, cell: config.cell, solver: config.solver, output: { propagators: true } }).solution;
  // The start: the spectral solution at χN = 14 in the χN = 15 cell.
  const start = solveFromConfig({ system: { ...config.system, chiN: 14 }, cell: { ...config.cell, period: reference.length }, solver: config.solver, output: { propagators: true } }).solution;
  const nets = buildScftNetworks(tf, config, chain, reference.length, true);
  warmStart(tf, nets, { x: start.x, w: start.w, chiN: 14, propagators: start.propagators }, 300, 0.01);
  const theta = nets.parameters.flatten();
  nets.dispose();
  return { tf, config, chain, reference, theta };
}

async function run(s: Awaited<ReturnType<typeof setup>>, fieldStep: 'anderson' | 'simple') {
  const { tf, config, chain, reference } = s;
  const nets = buildScftNetworks(tf, config, chain, reference.length, true);
  nets.parameters.unflatten(s.theta);
  const startError = evaluateNetworks(tf, nets, config, reference).errors.phiA.relativeL2;
  const so = await runSecondOrder(
    nets,
    config.system,
    config.losses.weights,
    { iterations: 40, nx: 24, nodesPerBlock: 16, damping: 'marquardt', evaluateEvery: 0, lossTolerance: 0, strategy: 'alternating', cycles: 6, firstCycleIterations: 8, jointIterations: 0, fieldMixing: 0.5, fieldStep, andersonHistory: 8, periods: reference.periods },
    {},
  );
  const phiError = evaluateNetworks(tf, nets, config, reference).errors.phiA.relativeL2;
  nets.dispose();
  return { startError, steps: so.fieldSteps, phiError };
}

describe('the Anderson field step', () => {
  it('on a continuation step (χN 14 → 15): exact refits, the SCFT deviation falls at every step and the φA error against the reference falls below half its start; simple mixing ends level with it at this size', async () => {
    const s = await setup();
    const anderson = await run(s, 'anderson');
    const simple = await run(s, 'simple');
    // 40 iterations: 8 per propagator before the first step, then 3 per propagator between steps
    // (48 with 12 first cost a fifth more; 36 with 6 first measured a rise of the deviation at the
    // second step, 0.474 → 0.485 kT, before the propagators had settled).
    expect(anderson.steps.map((s) => s.afterIteration)).toEqual([16, 22, 28, 34]);
    expect(simple.steps.length).toBe(4);
    // The first step sees the same state in both runs.
    expect(anderson.steps[0].residual).toBeCloseTo(simple.steps[0].residual, 10);
    // The linear field network takes each step's target to within its truncation (8 modes on 24 points).
    for (const s of anderson.steps) expect(s.fitRms).toBeLessThan(2e-2 * anderson.steps[0].residual);
    // Measured (deterministic seeds): max |d| 0.478, 0.457, 0.370, 0.286 kT; φA 4.6e-2 → 1.3e-2.
    for (let i = 1; i < anderson.steps.length; i++) expect(anderson.steps[i].residual).toBeLessThan(anderson.steps[i - 1].residual);
    expect(anderson.phiError).toBeLessThan(0.5 * anderson.startError);
    // Simple mixing ended at 0.34 kT and 1.7e-2 here: with a few LM iterations per cycle the
    // propagators' own error limits both steps, so no advantage is asserted at this size
    // (docs/second-order-training.md has the full-size runs).
    expect(simple.phiError).toBeLessThan(0.5 * simple.startError);
    // Both runs start from the same warm-started parameters.
    expect(simple.startError).toBe(anderson.startError);
  }, 240_000);
});

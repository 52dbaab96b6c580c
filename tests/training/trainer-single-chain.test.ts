import { describe, expect, it } from 'vitest';
import { selectBackend } from '../../src/autodiff/backend.js';
import { networkSolution } from '../../src/network/network-solution.js';
import { buildScftNetworks } from '../../src/network/scft-networks.js';
import { trainRun } from '../../src/training/train-run.js';
import { warmStart } from '../../src/network/warm-start.js';
import { buildChain } from '../../src/physics/chain.js';
import { cfg, fieldSystem } from './trainer-configs.js';

describe('trainer: single-chain and homopolymer problems', () => {
  it('homopolymer in a cosine field: the network propagator matches the spectral one', async () => {
    // Reference: the spectral MDE solver, itself checked against analytic solutions (tests/spectral).
    // Measured (wasm): φA relative L2 1.9e-2 after 200 steps at learning rate 1e-2 (7e-3: 3.4e-2; 5e-3: 3.4e-2
    // at 250 and 7.6e-3 at 300; at 2e-3 the same fall takes 600 steps). The reference on 32 × 50, not 64 × 100:
    // the training points do not depend on it and φA's error came out the same on both (7.559e-3 after 300 steps at 5e-3).
    const r = await trainRun({ config: cfg({ system: fieldSystem, cell: { period: 4, nx: 32, ns: 50 }, warmStart: { type: 'none' }, training: { adamSteps: 200, learningRate: 1e-2 } }), backend: 'wasm' });
    expect(r.metrics.phase).toBe('single-chain');
    expect(r.metrics.sharedPropagator).toBe(true);
    expect(r.metrics.errors.phiA.relativeL2).toBeLessThan(3e-2);
    expect(r.metrics.errors.QRelativeError).toBeLessThan(3e-2);
    expect(r.history[r.history.length - 1].total).toBeLessThan(r.history[0].total / 5);
  });

  it('homopolymer melt: φ ≡ 1 and a flat field', async () => {
    // Exact (common practice, no source): a one-species melt has φ ≡ 1, w ≡ const, q ≡ 1 after the gauge.
    const r = await trainRun({ config: cfg({ system: { chain: { type: 'homopolymer', species: 'A' } }, cell: { period: 4, nx: 32, ns: 50 }, warmStart: { type: 'none' }, training: { adamSteps: 400, learningRate: 2e-3, fieldUpdateEvery: 20, fieldFitSteps: 50 } }), backend: 'wasm' });
    // Measured (wasm): max |φA + φB − 1| 1.6e-2, φA relative L2 8.2e-3 (250 steps leave 2.3e-2: the bound fails there).
    expect(r.metrics.phase).toBe('homogeneous-melt');
    expect(r.metrics.errors.incompressibilityMax).toBeLessThan(2e-2);
    for (const v of r.network.phi.A) expect(Math.abs(v - 1)).toBeLessThan(2e-2);
  });
});

describe('trainer: collapse to the disordered state is detected', () => {
  it('networks fitted to homogeneous fields are reported as disordered', async () => {
    const { tf } = await selectBackend('wasm');
    const config = cfg({ system: { chain: { type: 'diblock', f: 0.5 }, chiN: 15 }, cell: { period: 3.7, nx: 32, ns: 100 } });
    const chain = buildChain(config.system.chain);
    const nets = buildScftNetworks(tf, config, chain, 3.7, true);
    const x = Float64Array.from({ length: 32 }, (_, j) => (j * 3.7) / 32);
    // Disordered fields of the symmetric diblock in the zero-mean-pressure gauge: w_A = w_B = 0.
    // In those fields the exact propagators are q ≡ 1 (analytic: uniform zero field); fit both nets to that state.
    const s = Float64Array.from({ length: 21 }, (_, i) => i / 20);
    const ones = Array.from({ length: 21 }, () => new Float64Array(32).fill(1));
    // 100 fitting steps (measured: φA then varies by 5.0e-3 across the cell; after 1 step the networks still read as lamellar, and the check fails).
    warmStart(tf, nets, { x, w: { A: new Float64Array(32), B: new Float64Array(32) }, chiN: 15, propagators: { s, q: ones, qDagger: ones } }, 100, 1e-2);
    const sol = networkSolution(tf, nets, config.system, { periods: 1, nx: 32, nodesPerBlock: 16 });
    nets.dispose();
    expect(sol.phase).toBe('disordered');
    expect(sol.notes.join(' ')).toMatch(/collapsed to the homogeneous/);
  });
});

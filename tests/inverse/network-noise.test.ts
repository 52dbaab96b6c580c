import { describe, expect, it } from 'vitest';
import { estimateNetwork } from '../../src/inverse/network-estimator.js';
import { diblock, invert, synthData } from './helpers.js';

// Synthetic profiles come from the spectral reference (itself checked against Leibler's RPA,
// analytic propagators and an independent finite-difference solver in tests/spectral).
// In a file of its own so that the test runner can run it beside the noiseless one.
describe('network estimator of χN, noisy profile', () => {
  it('2 % Gaussian noise, started from the classical estimate: χN within 3 %', async () => {
    const chain = diblock(0.5);
    const { data } = synthData({ chain, chiN: 15, nx: 64, ns: 100, noise: 0.02, seed: 4 });
    const cl = invert(data, { chain, nx: 64, ns: 100 });
    // Measured (this case, seed 1), χN at the field updates from the classical 15.196: 15.33–15.37
    // during the 200 Adam steps (+2.5 % at most), 15.162 after 100 L-BFGS iterations, 15.057
    // after 200, 14.996 after 300. 200 iterations here (the estimate is then the one after 100,
    // +1.1 %); the 3 % bound holds along the whole measured path, so the check is that the
    // noise does not pull the estimator away from the truth.
    const ne = await estimateNetwork(data, cl, { chain, seeds: [1], steps: 200, fieldUpdateEvery: 50, lbfgsIterations: 200, lbfgsPerUpdate: 100, resolution: 0, backend: 'wasm' });
    expect(Math.abs(ne.chiN / 15 - 1)).toBeLessThan(0.03);
  });
});

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
    // The classical fit and the networks on 32 × 60 (the data from the 64 × 100 reference): the
    // classical estimate is then 15.196 on both grids.
    const cl = invert(data, { chain, nx: 32, ns: 60 });
    // Measured (this case, seed 1, model grid 64 × 100), χN at the field updates from the classical
    // 15.196: 15.33–15.37 during the 200 Adam steps (+2.5 % at most), 15.162 after 100 L-BFGS
    // iterations, 15.057 after 200, 14.996 after 300. On 32 × 60 (here): 15.351, 15.401, 15.398,
    // 15.349 at steps 50–200. The 3 % bound holds along the whole measured path on both grids, so
    // the check is that the noise does not pull the estimator away from the truth; here the path is
    // cut after its first 100 Adam steps (a fifth less CPU): updates at 50 and 100 (15.351, 15.401),
    // then one cycle of 30 L-BFGS iterations (the other tests of the estimator in tests/inverse skip
    // its L-BFGS cycles), estimate 15.4006 (+2.7 %, measured). Cheaper settings measured worse (same
    // case, 32 × 60): updates every 25 of 100 Adam steps ended at 15.82 (+5.5 %); a 200-step warm
    // start (not 400) reached 15.65 (+4.3 %) on the way, a 300-step one 15.43 (+2.9 %) at step 100.
    const ne = await estimateNetwork(data, cl, { chain, strategy: 'adam-lbfgs', seeds: [1], steps: 100, fieldUpdateEvery: 50, lbfgsIterations: 30, lbfgsPerUpdate: 30, resolution: 0, backend: 'wasm' });
    console.log(`network estimator, 2 % noise: χN ${ne.chiN} (trajectory ${ne.runs[0].trajectory.map((p) => p.chiN.toFixed(4)).join(', ')})`);
    expect(Math.abs(ne.chiN / 15 - 1)).toBeLessThan(0.03);
  });
});

import { describe, expect, it } from 'vitest';
import { estimateNetwork } from '../../src/inverse/network-estimator.js';
import { diblock, invert, synthData } from './helpers.js';

// One of the targets for the least-squares network estimator (χN a parameter of one
// Levenberg–Marquardt problem with the SCFT residuals and the data rows), on the shipped recipe;
// the others are in network-least-squares-{noiseless,noise,period}.test.ts, one run per file so
// that they run side by side. The profiles come from the spectral reference on a finer grid
// (128 × 200) than the estimator's (64 x points, 12 contour steps per block) and the classical
// fit's (32 × 60); the spectral reference itself is checked against Leibler's RPA, analytic
// propagators and an independent finite-difference solver in tests/spectral.
describe('least-squares network estimator: 2 % noise', () => {
  const chain = diblock(0.5);

  it('2 % noise, started at the classical estimate: χN inside the classical 95 % interval', async () => {
    const { data } = synthData({ chain, chiN: 15, nx: 128, ns: 200, noise: 0.02, seed: 1 });
    const cl = invert(data, { chain });
    // Not every noise draw: of noise seeds 1–15 (network seed 1, sigma column), measured in
    // docs/inverse.md, 10 ended inside the classical 95 % interval (seed 5 at 15.095, just below
    // the classical [15.104, 15.626], which misses the truth 15 itself on that draw), and the
    // demo's own draw at 14.803, below its [14.912, 15.213]. This draw is seed 1 (measured 15.006;
    // classical 15.012, 95 % [14.778, 15.257]): the check holds the plumbing and this draw's
    // figure, not the estimator's coverage.
    const ne = await estimateNetwork(data, cl, { chain, seeds: [1], steps: 0, resolution: 0, backend: 'wasm', strategy: 'least-squares' });
    console.log(`least-squares estimator, 2 % noise: χN ${ne.chiN}; classical ${cl.chiN}, 95 % [${cl.interval95.join(', ')}]`);
    expect(ne.chiN).toBeGreaterThan(cl.interval95[0]);
    expect(ne.chiN).toBeLessThan(cl.interval95[1]);
  }, 60_000);
});

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
describe('least-squares network estimator: a free period and the offset', () => {
  const chain = diblock(0.5);

  it('a free period and the offset: fitted with χN (started 3 % long, 0.1 Rg off and 10 % low, all come back)', async () => {
    const { data } = synthData({ chain, chiN: 15, nx: 128, ns: 200 });
    const cl = invert(data, { chain, period: { mode: 'free' } });
    expect(cl.periodMode).toBe('free');
    // The networks start at a period 3 % longer than the classical fit's and with the A-rich
    // domain 0.1 Rg away from the classical offset (on noiseless data both are the truth's to
    // 1e-5): the period must be a parameter of the fit, and the networks must move, to come back.
    const ne = await estimateNetwork(data, { ...cl, period: cl.period * 1.03, offset: cl.offset + 0.1 }, { chain, seeds: [1], steps: 0, chiNStart: 13.5, resolution: 0, backend: 'wasm', strategy: 'least-squares' });
    const run = ne.runs[0];
    const off = run.offset! - cl.offset;
    const offsetError = Math.abs(off - cl.period * Math.round(off / cl.period));
    console.log(`least-squares estimator, free period: χN ${ne.chiN}, period ${run.period} (classical ${cl.period}), offset ${run.offset} (classical ${cl.offset})`);
    expect(Math.abs(run.period! / cl.period - 1)).toBeLessThan(1e-3);
    expect(offsetError).toBeLessThan(2e-3);
    expect(Math.abs(ne.chiN / 15 - 1)).toBeLessThan(1e-3);
  }, 60_000);
});

import { describe, expect, it } from 'vitest';
import { estimateNetwork } from '../../src/inverse/network-estimator.js';
import { compareWithTruth } from '../../src/inverse/truth-comparison.js';
import { diblock, invert, synthData } from './helpers.js';

// The targets for the least-squares network estimator (χN a parameter of one
// Levenberg–Marquardt problem with the SCFT residuals and the data rows), on the shipped recipe.
// The profiles come from the spectral reference on a finer grid (128 × 200) than the estimator's
// (64 x points, 12 contour steps per block) and the classical fit's (32 × 60); the spectral
// reference itself is checked against Leibler's RPA, analytic propagators and an independent
// finite-difference solver in tests/spectral. The discovered exchange field is compared with the
// spectral self-consistent field at the true χN (compareWithTruth).
describe('least-squares network estimator: the targets', () => {
  const chain = diblock(0.5);

  it('noiseless f = 0.5, χN = 15, 64 points, started 10 % low: χN within 1e-3, w_A − w_B within 1e-2', async () => {
    const { data } = synthData({ chain, chiN: 15, nx: 128, ns: 200 });
    const cl = invert(data, { chain });
    // Measured (docs/inverse.md, "Joint and propagator iterations in cycles"): network seeds 1–5
    // ended at relative errors +2.8e-4, −2.1e-4, −5.2e-4, −5.3e-4, −3.7e-4, fields 0.8e-3 to 3.9e-3.
    const ne = await estimateNetwork(data, cl, { chain, seeds: [1], steps: 0, chiNStart: 13.5, resolution: 0, backend: 'wasm', strategy: 'least-squares' });
    const vs = compareWithTruth('synthetic', 15, chain, cl, ne).estimators.network;
    console.log(`least-squares estimator, noiseless: χN ${ne.chiN} (relative ${vs.relativeError.toExponential(2)}), w_A − w_B ${vs.exchangeFieldRelativeL2?.toExponential(2)}, ${ne.seconds.toFixed(1)} s`);
    expect(Math.abs(vs.relativeError)).toBeLessThan(1e-3);
    expect(vs.exchangeFieldRelativeL2).toBeLessThan(1e-2);
    // The networks fit the MDE between the residual grid's points as well as on them (no aliasing).
    const a = ne.runs[0].aliasing!;
    expect(a.between).toBeLessThan(2 * a.onGrid);
  }, 60_000);

  it('2 % noise, started at the classical estimate: χN inside the classical 95 % interval', async () => {
    const { data } = synthData({ chain, chiN: 15, nx: 128, ns: 200, noise: 0.02, seed: 1 });
    const cl = invert(data, { chain });
    // Not every noise draw: of noise seeds 1–5 (network seed 1, sigma column), measured in
    // docs/inverse.md, four ended inside the classical 95 % interval; seed 5 ended at 15.095, just
    // below the classical [15.104, 15.626] (which misses the truth 15 itself on that draw). This
    // draw is seed 1 (measured 15.006; classical 15.012, 95 % [14.778, 15.257]).
    const ne = await estimateNetwork(data, cl, { chain, seeds: [1], steps: 0, resolution: 0, backend: 'wasm', strategy: 'least-squares' });
    console.log(`least-squares estimator, 2 % noise: χN ${ne.chiN}; classical ${cl.chiN}, 95 % [${cl.interval95.join(', ')}]`);
    expect(ne.chiN).toBeGreaterThan(cl.interval95[0]);
    expect(ne.chiN).toBeLessThan(cl.interval95[1]);
  }, 60_000);

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

import { describe, expect, it } from 'vitest';
import { fitDirections } from '../../src/inverse/fit-directions.js';
import type { ClassicalEstimate } from '../../src/inverse/classical.js';
import type { ProfileData } from '../../src/inverse/profile-csv.js';
import { diblock, invert, synthData } from './helpers.js';

// At a weighted least-squares minimum the residual is orthogonal, in the 1/σ² metric, to the
// model's derivative along every fitted parameter (the normal equations of the fit: Nocedal &
// Wright, "Numerical Optimization", 2nd ed., §10.3). The classical fit finds its minimum by
// Brent's method on the profiled misfit, not from these directions, so the check is independent
// of how they are computed. Profiles from the spectral reference on a finer grid (128 × 200)
// than the fit's (32 × 60), with 2 % noise.
const chain = diblock(0.5);
/** Measured: offset about 1e-9, χN 5e-5 (Brent's tolerance on the profiled χN), period 3e-6; a held-period χN direction 0.14. */
const TOL = 1e-3;

/** |Σ w d r| / (|√w d| |√w r|) for each direction d: the cosine between it and the residual. */
function cosines(data: ProfileData, est: ClassicalEstimate, mode: ClassicalEstimate['periodMode']): number[] {
  const sol = est.solution;
  const { columns } = fitDirections(data.x, { chiN: est.chiN, period: est.period, offset: est.offset, periodMode: mode, nx: sol.nx, ns: sol.ns }, chain, 0);
  const w = Float64Array.from(data.sigma!, (s) => 1 / (s * s));
  const norm = (v: Float64Array) => Math.sqrt(v.reduce((a, x, i) => a + w[i] * x * x, 0));
  return columns.map((d) => Math.abs(d.reduce((a, x, i) => a + w[i] * x * est.residual[i], 0)) / (norm(d) * norm(est.residual)));
}

describe('the classical fit’s directions at its estimate', () => {
  it('equilibrium period: the residual is orthogonal to the offset and χN directions; the χN direction at a held period is not', () => {
    const { data } = synthData({ chain, chiN: 15, nx: 128, ns: 200, noise: 0.02, seed: 3 });
    const est = invert(data, { chain });
    const c = cosines(data, est, 'equilibrium');
    const held = cosines(data, est, 'given');
    console.log(`cosines: equilibrium ${c.map((v) => v.toExponential(2))}; χN at a held period ${held[1].toExponential(2)}`);
    expect(c).toHaveLength(2);
    for (const v of c) expect(v).toBeLessThan(TOL);
    // The check tells the two χN directions apart: along the held period the fit is not stationary.
    expect(held[1]).toBeGreaterThan(10 * TOL);
  }, 60_000);

  it('free period: the residual is orthogonal to the offset, χN and period directions', () => {
    const { data } = synthData({ chain, chiN: 15, nx: 128, ns: 200, noise: 0.02, seed: 3 });
    const est = invert(data, { chain, period: { mode: 'free' } });
    const c = cosines(data, est, 'free');
    console.log(`cosines: free ${c.map((v) => v.toExponential(2))}`);
    expect(c).toHaveLength(3);
    for (const v of c) expect(v).toBeLessThan(TOL);
  }, 60_000);
});

import { describe, expect, it } from 'vitest';
import { LamellaModel } from '../../src/inverse/lamella-model.js';
import { fitSpacingSeries } from '../../src/inverse/spacing-series.js';
import { GaussianNoise } from '../../src/numerics/random.js';
import { diblock } from './helpers.js';

describe('domain-spacing series: χ and b from D(N)', () => {
  it('recovers χ and b from periods of a finer reference, within the 95 % intervals', () => {
    // Scenario of our own: χ = 0.1, b = 0.7 nm, N = 150, 250, 400; D from a 64 × 120 reference, 1 % noise.
    const chi = 0.1;
    const b = 0.7;
    const Ns = [150, 250, 400];
    const fine = new LamellaModel({ chain: diblock(0.5), nx: 64, ns: 120 });
    const noise = new GaussianNoise(5);
    const D = Ns.map((N) => fine.equilibrium(chi * N).period * b * Math.sqrt(N / 6));
    const Dn = D.map((d) => d * (1 + 0.01 * noise.next()));
    const fit = fitSpacingSeries({ source: 'spacing.csv', N: Ns, D: Dn, dD: D.map((d) => 0.01 * d) }, { chain: diblock(0.5), nx: 32, ns: 60, chiRange: [0.08, 0.13] });
    const i95 = fit.intervals['95%'];
    expect(i95.chi[0]).toBeLessThan(chi);
    expect(i95.chi[1]).toBeGreaterThan(chi);
    expect(i95.b[0]).toBeLessThan(b);
    expect(i95.b[1]).toBeGreaterThan(b);
  });
});

/**
 * The soft-constraint variants of the propagator networks (networks.propagator.periodicity and
 * .initialCondition = 'soft') in short training runs (split from soft-constraints.test.ts, which
 * checks their features, networks and loss terms, so that the two files run side by side).
 * Oracle: the spectral reference of the same system (pseudo-spectral MDE, tests/spectral).
 */
import { describe, expect, it } from 'vitest';
import { trainConfigSchema } from '../../src/io/schemas/train-config.js';
import { trainRun } from '../../src/training/train-run.js';

// One short training run with both soft forms at once (150 Adam steps after a 200-step warm start,
// 2×32 networks) carries the checks of both terms; the unit tests in soft-constraints.test.ts cover
// each form on its own. Measured here: total loss fell to 0.37 of its first logged value, the
// periodicity term to 0.30, the initial-condition term to 0.025; φA relative L2 error 0.26. Run
// separately on the same budget the forms gave 0.29 and 0.11 of the loss and φA errors 0.32 (soft
// periodicity) and 0.23 (soft IC); exact forms 0.027. These runs are far from converged (the README
// compares the variants on the full budget). Since every solution puts an A-domain centre at x = 0
// (physics/phase-convention.ts), the cell's ends cut an A domain, and a soft periodicity misses
// there; the φA bound says so. 64 contour steps (not 100) make the warm start's targets 65 rows
// instead of 101 (network/warm-start.ts); measured with 64: 0.38, 0.30, 0.028, φA 0.25. A 200-step
// warm start (not 300; cheaper): 0.18, 0.39, 0.002, φA 0.31 (measured); 100 steps left φA at 0.45.
const LOSS_FALL = 0.5;
const PHI_BOUND = 0.4;

describe('the soft variants train (wasm)', () => {
  it('periodicity and initial condition both soft: the loss and both soft terms fall, φA stays near the reference', async () => {
    // Symmetric diblock at χN = 15 in a cell of its equilibrium period (3.71369 Rg, README),
    // warm-started from the spectral reference; small networks and a short budget.
    const config = trainConfigSchema.parse({
      version: 2,
      kind: 'train',
      system: { chain: { type: 'diblock', f: 0.5 }, chiN: 15 },
      cell: { period: 3.71369, nx: 32, ns: 64 },
      networks: { field: { hidden: [32, 32] }, propagator: { hidden: [32, 32], periodicity: 'soft', initialCondition: 'soft' } },
      collocation: { nx: 24, random: 128 },
      warmStart: { adamSteps: 200, learningRate: 0.01 },
      training: { adamSteps: 150, learningRate: 1e-3, logEvery: 10 },
    });
    const r = await trainRun({ config, backend: 'wasm' });
    const adam = r.history.filter((h) => h.stage === 'adam' && Object.keys(h.terms).length > 0); // the logged steps, with their terms
    const first = adam[0];
    const last = adam[adam.length - 1];
    expect(last.total).toBeLessThan(LOSS_FALL * first.total);
    for (const term of ['periodicity', 'initial'] as const) {
      expect(first.terms[term]!, term).toBeGreaterThan(0);
      expect(last.terms[term]!, term).toBeLessThan(LOSS_FALL * first.terms[term]!);
    }
    expect(r.metrics.phase).toBe('lamellar');
    expect(r.metrics.errors.phiA.relativeL2).toBeLessThan(PHI_BOUND);
  }); // the suite's own limit (vitest.config.ts, 300 s): at load 20+ on two cores this run took over 120 s
});

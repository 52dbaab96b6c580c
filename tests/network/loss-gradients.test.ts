import { describe, expect, it } from 'vitest';
import { trainConfigSchema } from '../../src/io/schemas/train-config.js';
import { selectBackend } from '../../src/autodiff/backend.js';
import { buildScftNetworks } from '../../src/network/scft-networks.js';
import { LOSS_TERMS } from '../../src/network/losses/terms.js';
import { ScftProblem } from '../../src/network/problem/scft-problem.js';
import { buildChain } from '../../src/physics/chain.js';

// Parameter gradients of the full SCFT loss (every term, fields coupled into the MDE)
// against central finite differences of the loss itself (common practice, no source).
// 'soft': soft periodicity and initial condition, so their two terms are in the loss too.
describe('full-loss parameter gradients', () => {
  for (const [backend, constraints] of [['cpu', 'exact'], ['wasm', 'exact'], ['cpu', 'soft'], ['wasm', 'soft']] as const) {
    it(`match finite differences on ${backend} (${constraints} constraints)`, async () => {
      const { tf } = await selectBackend(backend);
      const config = trainConfigSchema.parse({
        version: 2,
        kind: 'train',
        system: { chain: { type: 'diblock', f: 0.4 }, chiN: 14 },
        networks: { field: { hidden: [6] }, propagator: { hidden: [6, 6], periodicity: constraints, initialCondition: constraints } },
        collocation: { nx: 8, nodesPerBlock: 4, random: 16 },
      });
      const chain = buildChain(config.system.chain);
      const nets = buildScftNetworks(tf, config, chain, 3.5, true);
      const problem = new ScftProblem(tf, nets, config.system, config.collocation, 'coupled');
      problem.resample(0);
      const weights = { mde: 1, periodicity: 4, initial: 6, incompressibility: 3, selfConsistency: 5, gauge: 2 };
      if (constraints === 'soft') {
        // The soft terms are a sizeable part of the loss here, so their gradients are tested.
        const t = tf.tidy(() => problem.terms());
        expect(t.periodicity.dataSync()[0]).toBeGreaterThan(1e-3);
        expect(t.initial.dataSync()[0]).toBeGreaterThan(1e-3);
      }
      const lossAt = () => tf.tidy(() => problem.total(weights).total.dataSync()[0]);
      let grad!: Float64Array;
      tf.tidy(() => {
        const { grads } = tf.variableGrads(() => {
          const { total, parts } = problem.total(weights);
          for (const k of LOSS_TERMS) parts[k].dispose();
          return total;
        }, nets.parameters.variables());
        grad = nets.parameters.flattenGradients(grads);
      });
      const x0 = nets.parameters.flatten();
      // Probe parameters spread over the field net and every propagator piece.
      const probes = [0, 5, 17, Math.floor(x0.length / 3), Math.floor(x0.length / 2), x0.length - 7, x0.length - 1];
      for (const i of probes) {
        const h = 2e-2;
        const x = Float64Array.from(x0);
        x[i] = x0[i] + h;
        nets.parameters.unflatten(x);
        const fp = lossAt();
        x[i] = x0[i] - h;
        nets.parameters.unflatten(x);
        const fm = lossAt();
        nets.parameters.unflatten(x0);
        const fd = (fp - fm) / (2 * h);
        // float32 losses: compare with an absolute floor relative to the gradient scale.
        const scale = Math.max(...Array.from(grad, Math.abs));
        expect(Math.abs(fd - grad[i])).toBeLessThan(2e-2 * Math.abs(grad[i]) + 2e-3 * scale);
      }
      problem.dispose();
      nets.dispose();
    });
  }
});

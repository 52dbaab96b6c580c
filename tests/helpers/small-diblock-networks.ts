/**
 * Untrained SCFT networks of a small diblock (period 4 Rg, χN 12, a linear field network on 4
 * modes, 2×6 propagator networks, wasm backend): the setting of the second-order phase's wiring
 * tests, which check what an option does to a run, not an accuracy.
 */
import { selectBackend } from '../../src/autodiff/backend.js';
import { trainConfigSchema } from '../../src/io/schemas/train-config.js';
import { buildChain } from '../../src/physics/chain.js';
import { buildScftNetworks } from '../../src/network/scft-networks.js';
import { runSecondOrder } from '../../src/training/second-order-phase.js';
import type { SecondOrderSettings } from '../../src/training/second-order-phase.js';

export async function smallDiblockNetworks(f: number) {
  const config = trainConfigSchema.parse({
    version: 2,
    kind: 'train',
    system: { chain: { type: 'diblock', f }, chiN: 12 },
    cell: { period: 4, nx: 32, ns: 40 },
    networks: { field: { hidden: [], fourierModes: 4 }, propagator: { hidden: [6, 6] } },
  });
  const { tf } = await selectBackend('wasm');
  return { config, nets: buildScftNetworks(tf, config, buildChain(config.system.chain), 4, true) };
}

/**
 * The alternating second-order phase on those networks (16 grid points, 8 contour steps per
 * block, simple field steps, no reference): the base of the phase's wiring tests, `settings`
 * laid over it. The networks are disposed after the run.
 */
export async function smallAlternatingRun(f: number, settings: Partial<SecondOrderSettings>) {
  const { config, nets } = await smallDiblockNetworks(f);
  const base: SecondOrderSettings = { iterations: 8, nx: 16, nodesPerBlock: 8, damping: 'marquardt', evaluateEvery: 0, lossTolerance: 0, strategy: 'alternating', cycles: 2, firstCycleIterations: 0, jointIterations: 0, fieldMixing: 0.5, fieldStep: 'simple', andersonHistory: 1, periods: 1 };
  try {
    return await runSecondOrder(nets, config.system, config.losses.weights, { ...base, ...settings }, {});
  } finally {
    nets.dispose();
  }
}

/**
 * Untrained SCFT networks of a small diblock (period 4 Rg, χN 12, a linear field network on 4
 * modes, 2×6 propagator networks, wasm backend): the setting of the second-order phase's wiring
 * tests, which check what an option does to a run, not an accuracy.
 */
import { selectBackend } from '../../src/autodiff/backend.js';
import { trainConfigSchema } from '../../src/io/schemas/train-config.js';
import { buildChain } from '../../src/physics/chain.js';
import { buildScftNetworks } from '../../src/network/scft-networks.js';

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

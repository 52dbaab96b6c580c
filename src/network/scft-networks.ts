/**
 * The networks of one SCFT problem: a field network for w_A, w_B (absent for a chain in
 * prescribed fields) and propagator networks for ln q along the chain and ln q† along the
 * reversed chain (one shared network when the chain reads the same from both ends).
 */
import type { TrainConfig } from '../io/schemas/train-config.js';
import type { Chain } from '../physics/chain.js';
import { reverseChain } from '../physics/chain.js';
import type { Tf } from '../autodiff/tf.js';
import { FieldNet } from './field-net.js';
import { ParameterSet } from '../autodiff/parameters.js';
import { PropagatorNet } from './propagator-net.js';

export interface ScftNetworks {
  chain: Chain;
  reversed: Chain;
  length: number;
  field: FieldNet | null;
  q: PropagatorNet;
  qDagger: PropagatorNet;
  shared: boolean;
  parameters: ParameterSet;
  dispose(): void;
}

function blockBounds(chain: Chain): number[] {
  return [0, ...chain.blocks.map((b) => b.end)];
}

export function buildScftNetworks(tf: Tf, config: Pick<TrainConfig, 'networks'>, chain: Chain, length: number, withField: boolean): ScftNetworks {
  const reversed = reverseChain(chain);
  const field = withField ? new FieldNet(tf, config.networks.field, { period: length, outputs: 2, name: 'field' }) : null;
  const q = new PropagatorNet(tf, config.networks.propagator, { period: length, blocks: blockBounds(chain), name: 'q' });
  const shared = chain.palindromic && config.networks.shareWhenPalindromic;
  const qDagger = shared
    ? q
    : new PropagatorNet(tf, { ...config.networks.propagator, seed: config.networks.propagator.seed + 1 }, { period: length, blocks: blockBounds(reversed), name: 'qDagger' });
  const sets = [...(field ? [field.parameters] : []), q.parameters, ...(shared ? [] : [qDagger.parameters])];
  const parameters = ParameterSet.join(...sets);
  return {
    chain,
    reversed,
    length,
    field,
    q,
    qDagger,
    shared,
    parameters,
    dispose: () => parameters.dispose(),
  };
}

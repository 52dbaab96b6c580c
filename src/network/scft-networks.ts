/**
 * The networks of one SCFT problem: a field network for w_A, w_B (absent for a chain in
 * prescribed fields) and propagator networks for ln q along the chain and ln q† along the
 * reversed chain (one shared network when the chain reads the same from both ends).
 */
import type { TrainConfig } from '../io/schemas/train-config.js';
import type { Chain } from '../physics/chain.js';
import { reverseChain } from '../physics/chain.js';
import type { Tf } from '../autodiff/tf.js';
import type { Cell } from '../physics/cell/cell.js';
import { PeriodicCell } from '../physics/cell/periodic-cell.js';
import { InputError } from '../io/errors.js';
import { FieldNet } from './field-net.js';
import { ParameterSet } from '../autodiff/parameters.js';
import { PropagatorNet } from './propagator-net.js';

export interface ScftNetworks {
  chain: Chain;
  reversed: Chain;
  length: number;
  /** The cell the networks live in (its features, boundary condition, surface field; grids by withPoints). */
  cell: Cell;
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

/** The networks in `cell` (a number: a periodic cell of that length holding one period). */
export function buildScftNetworks(tf: Tf, config: Pick<TrainConfig, 'networks'>, chain: Chain, cellOrLength: Cell | number, withField: boolean): ScftNetworks {
  const cell = typeof cellOrLength === 'number' ? new PeriodicCell(cellOrLength, 32, 1) : cellOrLength;
  const length = cell.length;
  if (cell.kind !== 'periodic' && config.networks.propagator.periodicity === 'soft') {
    throw new InputError(`networks.propagator.periodicity: got "soft"; a ${cell.kind} cell has walls, not periods (allowed: "exact", the cosine features that keep ∂q/∂z = 0 at the walls)`);
  }
  const reversed = reverseChain(chain);
  const field = withField ? new FieldNet(tf, config.networks.field, { cell, outputs: 2, name: 'field' }) : null;
  const q = new PropagatorNet(tf, config.networks.propagator, { cell, blocks: blockBounds(chain), name: 'q' });
  const shared = chain.palindromic && config.networks.shareWhenPalindromic;
  const qDagger = shared
    ? q
    : new PropagatorNet(tf, { ...config.networks.propagator, seed: config.networks.propagator.seed + 1 }, { cell, blocks: blockBounds(reversed), name: 'qDagger' });
  const sets = [...(field ? [field.parameters] : []), q.parameters, ...(shared ? [] : [qDagger.parameters])];
  const parameters = ParameterSet.join(...sets);
  return {
    chain,
    reversed,
    length,
    cell,
    field,
    q,
    qDagger,
    shared,
    parameters,
    dispose: () => parameters.dispose(),
  };
}

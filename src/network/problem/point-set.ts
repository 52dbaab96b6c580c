/**
 * A set of collocation points (x_i, s_i) of one propagator with the constants the MDE needs
 * at each point, prepared once: the network's features (propagator-net.ts), the
 * diffusivity D = (b_K/b)² and the A indicator of the block the point's s falls in, and the
 * field-network features at x_i (or, for a chain in prescribed fields, w at the point).
 *
 * Units: x in Rg, s ∈ [0, 1] along the propagator's own chain (the reversed chain for q†),
 * w in kT per chain.
 */
import type * as TfModule from '@tensorflow/tfjs';
import type { Jet } from '../../autodiff/jet.js';
import type { Tf } from '../../autodiff/tf.js';
import type { SystemSpec } from '../../physics/chain-schema.js';
import type { Chain } from '../../physics/chain.js';
import { fieldAtPoints } from '../../physics/fields.js';
import { InputError } from '../../io/errors.js';
import { blockAt } from '../../physics/contour.js';
import type { PropagatorNet, PropagatorPoints } from '../propagator-net.js';
import type { ScftNetworks } from '../scft-networks.js';

/** Which propagator: q along the chain, or q† along the reversed chain. */
export type Side = 'q' | 'qDagger';

export interface PointSet {
  side: Side;
  points: PropagatorPoints;
  x: Float64Array;
  s: Float64Array;
  /** [n, 1]: D = (b_K/b)² and the A indicator of the block at each point. */
  diffusivity: TfModule.Tensor;
  maskA: TfModule.Tensor;
  /** Field-net input features at the points' x (value only), or prescribed w at the points. */
  fieldFeatures: Jet | null;
  prescribedW: TfModule.Tensor | null;
  dispose(): void;
}

/** The network and the chain (in its own contour direction) of one side. */
export function sideOf(nets: ScftNetworks, side: Side): { net: PropagatorNet; chain: Chain } {
  return side === 'q' ? { net: nets.q, chain: nets.chain } : { net: nets.qDagger, chain: nets.reversed };
}

/** Prepare the points (x_i, s_i) of one side; its tensors are kept until dispose(). */
export function preparePointSet(tf: Tf, nets: ScftNetworks, system: SystemSpec, side: Side, x: Float64Array, s: Float64Array): PointSet {
  const { net, chain } = sideOf(nets, side);
  const n = x.length;
  const D = new Float32Array(n);
  const mA = new Float32Array(n);
  for (let i = 0; i < n; i++) {
    const at = chain.blocks[blockAt(chain, s[i])];
    D[i] = at.diffusivity;
    mA[i] = at.species === 'A' ? 1 : 0;
  }
  const points = net.prepare(x, s, true);
  const diffusivity = tf.keep(tf.tensor2d(D, [n, 1]));
  const maskA = tf.keep(tf.tensor2d(mA, [n, 1]));
  const fieldFeatures = nets.field ? nets.field.features(x, false) : null;
  let prescribedW: TfModule.Tensor | null = null;
  if (!nets.field) {
    const ext = system.externalField;
    if (ext && nets.cell.kind !== 'periodic') throw new InputError(`system.externalField: prescribed fields are read in a periodic cell; got cell.kind "${nets.cell.kind}" (allowed: a self-consistent melt in a film)`);
    const wA = ext?.A ? fieldAtPoints(ext.A, nets.length, x) : new Float64Array(n);
    const wB = ext?.B ? fieldAtPoints(ext.B, nets.length, x) : new Float64Array(n);
    prescribedW = tf.keep(tf.tensor2d(Float32Array.from(wA, (v, i) => (mA[i] ? v : wB[i])), [n, 1]));
  }
  return {
    side,
    points,
    x,
    s,
    diffusivity,
    maskA,
    fieldFeatures,
    prescribedW,
    dispose: () => {
      points.dispose();
      diffusivity.dispose();
      maskA.dispose();
      fieldFeatures?.dispose();
      prescribedW?.dispose();
    },
  };
}

/** The points of `a` followed by those of `b` (same side) as one new set: one network pass for both. */
export function joinPointSets(tf: Tf, nets: ScftNetworks, system: SystemSpec, a: PointSet, b: PointSet): PointSet {
  const x = new Float64Array(a.x.length + b.x.length);
  const s = new Float64Array(x.length);
  x.set(a.x);
  x.set(b.x, a.x.length);
  s.set(a.s);
  s.set(b.s, a.s.length);
  return preparePointSet(tf, nets, system, a.side, x, s);
}

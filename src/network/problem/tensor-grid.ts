/**
 * The fixed points of one SCFT problem, prepared once:
 *   - a tensor grid per propagator, the cell's grid (x_j = jL/nx, j < nx, periodic; the cell
 *     centres of a film) × the contour nodes
 *     of physics/contour.ts (nodesPerBlock Simpson intervals per block, or their total spread by the blocks' lengths), laid out s-major (row i holds the nx points at node s_i); it carries
 *     both the MDE residual and the quadrature of φ (losses/densities.ts), so one forward
 *     pass with derivative channels gives every term;
 *   - the field network's features at the grid's x;
 *   - with soft periodicity, the two ends x = 0 and x = L of each propagator at the grid's
 *     contour nodes (losses/periodicity.ts).
 * Units: x in Rg, s ∈ [0, 1].
 */
import type * as TfModule from '@tensorflow/tfjs';
import type { Jet } from '../../autodiff/jet.js';
import type { Tf } from '../../autodiff/tf.js';
import type { SystemSpec } from '../../physics/chain-schema.js';
import { collocationContours } from '../../physics/contour.js';
import type { Contour, ContourSpread } from '../../physics/contour.js';
import type { PropagatorNet, PropagatorPoints } from '../propagator-net.js';
import type { ScftNetworks } from '../scft-networks.js';
import { preparePointSet } from './point-set.js';
import type { PointSet } from './point-set.js';

export class TensorGrid {
  readonly nodes: Contour;
  readonly nodesReversed: Contour;
  readonly x: Float64Array;
  readonly nx: number;
  /** [1, nodes] Simpson weights per species (losses/densities.ts). */
  readonly weightsA: TfModule.Tensor;
  readonly weightsB: TfModule.Tensor;
  readonly fieldFeatures: Jet | null;
  /** A film's surface field h at the grid's x, [1, nx] (the self-consistency term), or null. */
  readonly surfaceField: TfModule.Tensor | null;
  readonly q: PointSet;
  readonly qDagger: PointSet;
  /** Soft periodicity: the points (0, s_i) then (L, s_i) at the grid's contour nodes, per propagator. */
  readonly ends: { q: PropagatorPoints; qDagger: PropagatorPoints } | null;

  constructor(tf: Tf, nets: ScftNetworks, system: SystemSpec, nx: number, nodesPerBlock: number, spread: ContourSpread = 'equal') {
    const contours = collocationContours(nets.chain, nets.reversed, nodesPerBlock, spread, 'collocation.nodesPerBlock');
    this.nodes = contours.q;
    this.nodesReversed = contours.qDagger;
    this.x = nets.cell.withPoints(nx).x;
    const h = nets.cell.surfaceFieldAt(this.x);
    this.surfaceField = h ? tf.keep(tf.tensor2d(Float32Array.from(h), [1, nx])) : null;
    this.nx = nx;
    const nn = this.nodes.s.length;
    const xs = new Float64Array(nn * nx);
    const ss = new Float64Array(nn * nx);
    const ssR = new Float64Array(nn * nx);
    for (let i = 0; i < nn; i++) {
      for (let j = 0; j < nx; j++) {
        xs[i * nx + j] = this.x[j];
        ss[i * nx + j] = this.nodes.s[i];
        ssR[i * nx + j] = this.nodesReversed.s[i];
      }
    }
    this.weightsA = tf.keep(tf.tensor2d(Float32Array.from(this.nodes.weights.A), [1, nn]));
    this.weightsB = tf.keep(tf.tensor2d(Float32Array.from(this.nodes.weights.B), [1, nn]));
    this.fieldFeatures = nets.field ? nets.field.features(this.x, false) : null;
    this.q = preparePointSet(tf, nets, system, 'q', xs, ss);
    this.qDagger = preparePointSet(tf, nets, system, 'qDagger', xs, ssR);
    const atEnds = (net: PropagatorNet, sNodes: Float64Array) => {
      const x = Float64Array.from({ length: 2 * nn }, (_, i) => (i < nn ? 0 : nets.length));
      return net.prepare(x, Float64Array.from({ length: 2 * nn }, (_, i) => sNodes[i % nn]), true);
    };
    this.ends = nets.q.config.periodicity === 'soft' ? { q: atEnds(nets.q, this.nodes.s), qDagger: atEnds(nets.qDagger, this.nodesReversed.s) } : null;
  }

  /** Contour nodes per propagator (rows of the grid). */
  get rows(): number {
    return this.nodes.s.length;
  }

  dispose(): void {
    this.q.dispose();
    this.qDagger.dispose();
    this.weightsA.dispose();
    this.weightsB.dispose();
    this.fieldFeatures?.dispose();
    this.surfaceField?.dispose();
    this.ends?.q.dispose();
    this.ends?.qDagger.dispose();
  }
}

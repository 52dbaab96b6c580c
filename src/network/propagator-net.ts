/**
 * Propagator network for q(x, s), s ∈ [0, 1] the contour variable, x in Rg, obeying the cell's
 * boundary condition through its features (features.ts: L-periodic, or even about a film's walls).
 *
 * Hard initial condition (docs/physics.md, "Network solutions"): the network gives
 *     u(x, s) = ln q(x, s),   q = exp(u) > 0,   u(x, 0) = 0 exactly,
 * so a loss may use the MDE in terms of u: ∂u/∂s = D(∂xx u + (∂x u)²) − w.
 *
 * pieces = 'single':  u = s · n(x, σ = s).
 * pieces = 'per-block': one network n_k per block k on [s_k, s_{k+1}], local coordinate
 *     σ = (s − s_k)/Δ_k, Δ_k = s_{k+1} − s_k, and
 *         u(x, s) = U_k(x) + (s − s_k) · n_k(x, σ),
 *         U_0 = 0,  U_k(x) = Σ_{j<k} Δ_j · n_j(x, σ = 1)   (= u(x, s_k) from block k−1),
 *     so u is continuous in s while ∂u/∂s may jump at each junction, as the MDE requires
 *     when w changes species there.
 * A point exactly at a junction s_k belongs to block k (the later one): its value is the
 * same from both sides; its ∂s channel is the right-hand derivative. s = 1 belongs to the
 * last block.
 *
 * Soft constraints (config `periodicity`, `initialCondition`; the defaults are the exact forms):
 *   initialCondition 'soft': the first piece drops its factor, u = n_0(x, σ) on [0, s_1], so
 *     U_1(x) = n_0(x, σ = 1) and U_k = U_1 + Σ_{1≤j<k} Δ_j n_j(x, 1); the later pieces and
 *     their continuous joins are unchanged, and u(x, 0) = 0 is left to the `initial` loss.
 *   periodicity 'soft': x enters through ξ = 2x/L − 1 (features.ts) instead of the periodic
 *     features, so u(0, s) = u(L, s) is left to the `periodicity` loss.
 *
 * Cost: features of fixed points are computed once (prepare), and the junction terms
 * U_k are evaluated on the distinct x values of a block's points (an x grid for the usual
 * tensor-product collocation) and gathered to the points, not evaluated at every point.
 */
import type * as TfModule from '@tensorflow/tfjs';
import type { PropagatorNetworkConfig } from '../io/schemas/network-schema.js';
import type { Tf } from '../autodiff/tf.js';
import { periodicFeatureCell, propagatorFeatures, xInputWidth } from './features.js';
import type { FeatureCell } from './features.js';
import { concatRows, Jet } from '../autodiff/jet.js';
import { Mlp } from '../autodiff/mlp.js';
import { ParameterSet } from '../autodiff/parameters.js';
import { childSeed } from '../numerics/random.js';

export interface PropagatorNetOptions {
  /** Periodic cell length L in Rg (when no `cell` is given). */
  period?: number;
  /** The cell whose features the network uses. */
  cell?: FeatureCell;
  /** Block boundaries 0 = s_0 < s_1 < … < s_K = 1 (chain order of this propagator). */
  blocks: number[];
  /** Output channels (1 for a single propagator). */
  outputs?: number;
  /** Prefix of the parameter names. */
  name?: string;
}

interface Piece {
  start: number;
  length: number;
  mlp: Mlp;
}

interface Batch {
  piece: number;
  features: Jet;
  /** s − s_k as a jet: values [n, 1], ∂s = 1. */
  offset: Jet;
  /** Features at the distinct x of this batch with σ = 1, and the gather index, for U_k. */
  junction: { features: Jet; index: TfModule.Tensor | null } | null;
}

/** Fixed collocation points prepared once for one PropagatorNet; dispose when done. */
export class PropagatorPoints {
  constructor(
    readonly n: number,
    readonly batches: Batch[],
    /** Row of each original point in the concatenated batch output, when not the identity. */
    readonly order: TfModule.Tensor | null,
    readonly derivatives: boolean,
  ) {}

  dispose(): void {
    for (const b of this.batches) {
      b.features.dispose();
      b.offset.dispose();
      b.junction?.features.dispose();
      b.junction?.index?.dispose();
    }
    this.order?.dispose();
  }
}

export class PropagatorNet {
  readonly pieces: Piece[];
  readonly parameters: ParameterSet;
  readonly outputs: number;
  readonly cell: FeatureCell;

  constructor(
    readonly tf: Tf,
    readonly config: PropagatorNetworkConfig,
    readonly options: PropagatorNetOptions,
  ) {
    if (options.cell) this.cell = options.cell;
    else {
      if (!(options.period! > 0)) throw new RangeError(`period must be > 0, got ${options.period}`);
      this.cell = periodicFeatureCell(options.period!);
    }
    // Soft periodicity replaces the periodic features by a scaled x: it has no meaning between walls.
    if (config.periodicity === 'soft' && this.cell.features.kind !== 'fourier') throw new RangeError('soft periodicity needs a periodic cell');
    const b = options.blocks;
    if (b.length < 2 || b[0] !== 0 || b[b.length - 1] !== 1 || b.some((v, i) => i > 0 && !(v > b[i - 1]))) {
      throw new RangeError(`blocks must rise strictly from 0 to 1, got [${b}]`);
    }
    this.outputs = options.outputs ?? 1;
    const bounds = config.pieces === 'single' ? [0, 1] : b;
    const name = options.name ?? 'propagator';
    this.pieces = [];
    for (let k = 0; k + 1 < bounds.length; k++) {
      const mlp = new Mlp(tf, {
        inputs: xInputWidth(config.fourierModes, config.periodicity, this.cell.features) + 1,
        hidden: config.hidden,
        outputs: this.outputs,
        activation: config.activation,
        seed: bounds.length === 2 ? config.seed : childSeed(config.seed, k),
        name: `${name}/piece${k}`,
      });
      this.pieces.push({ start: bounds[k], length: bounds[k + 1] - bounds[k], mlp });
    }
    this.parameters = new ParameterSet(
      tf,
      this.pieces.flatMap((p) => p.mlp.entries),
    );
  }

  /** Index of the piece containing s (junction points go to the later piece). */
  pieceOf(s: number): number {
    if (!(s >= 0 && s <= 1)) throw new RangeError(`contour position s must lie in [0, 1], got ${s}`);
    const P = this.pieces;
    for (let k = P.length - 1; k > 0; k--) if (s >= P[k].start) return k;
    return 0;
  }

  /**
   * Prepare fixed points (x_i, s_i): features, contour offsets, junction grids. Tensors are
   * kept out of tf.tidy until points.dispose(). With derivatives = false the forward pass
   * computes values only (all derivative channels null).
   */
  prepare(x: ArrayLike<number>, s: ArrayLike<number>, derivatives = true): PropagatorPoints {
    const tf = this.tf;
    const n = x.length;
    if (s.length !== n) throw new RangeError(`x and s differ in length (${n} and ${s.length})`);
    const members: number[][] = this.pieces.map(() => []);
    let contiguous = true;
    let lastPiece = 0;
    for (let i = 0; i < n; i++) {
      const k = this.pieceOf(s[i]);
      if (k < lastPiece) contiguous = false;
      lastPiece = k;
      members[k].push(i);
    }
    const L = this.cell;
    const M = this.config.fourierModes;
    const xin = this.config.periodicity;
    const batches: Batch[] = [];
    members.forEach((idx, k) => {
      if (idx.length === 0) return;
      const piece = this.pieces[k];
      const xs = idx.map((i) => x[i]);
      const ss = idx.map((i) => s[i]);
      const features = propagatorFeatures(tf, xs, ss, L, M, piece, derivatives, xin).keep();
      const offset = new Jet(
        tf,
        tf.tensor2d(Float32Array.from(ss, (v) => v - piece.start), [idx.length, 1]),
        null,
        null,
        derivatives ? tf.ones([1, 1]) : null,
      ).keep();
      let junction: Batch['junction'] = null;
      if (k > 0) {
        // Distinct x values of this batch (exact equality: collocation grids repeat x exactly).
        const where = new Map<number, number>();
        const ux: number[] = [];
        const index = new Int32Array(idx.length);
        xs.forEach((xv, r) => {
          let j = where.get(xv);
          if (j === undefined) {
            j = ux.length;
            where.set(xv, j);
            ux.push(xv);
          }
          index[r] = j;
        });
        // σ = 1 at the end of every earlier piece; ∂s is not needed (U_k depends on x only).
        const f = propagatorFeatures(tf, ux, ux.map(() => 1), L, M, { start: 0, length: 1 }, derivatives, xin);
        const jf = new Jet(tf, f.v, f.dx, f.dxx, null).keep();
        if (f.ds) f.ds.dispose();
        const identity = ux.length === idx.length;
        junction = { features: jf, index: identity ? null : tf.keep(tf.tensor1d(index, 'int32')) };
      }
      batches.push({ piece: k, features, offset, junction });
    });
    let order: TfModule.Tensor | null = null;
    if (!contiguous) {
      const pos = new Int32Array(n);
      let r = 0;
      for (const idx of members) for (const i of idx) pos[i] = r++;
      order = tf.keep(tf.tensor1d(pos, 'int32'));
    }
    return new PropagatorPoints(n, batches, order, derivatives);
  }

  /** u = ln q at the prepared points: jet [n, outputs] with v, ∂x, ∂xx, ∂s channels. */
  logQ(points: PropagatorPoints): Jet {
    // Soft initial condition: the first piece enters without its factor (s − s_0) (header).
    const free = this.config.initialCondition === 'soft';
    const factor = (j: number) => (free && j === 0 ? 1 : this.pieces[j].length);
    const outs = points.batches.map((b) => {
      const piece = this.pieces[b.piece];
      const n = piece.mlp.forward(b.features);
      let u = free && b.piece === 0 ? n : b.offset.mul(n);
      if (b.junction) {
        let U: Jet | null = null;
        for (let j = 0; j < b.piece; j++) {
          const term = this.pieces[j].mlp.forward(b.junction.features).scale(factor(j));
          U = U ? U.add(term) : term;
        }
        if (b.junction.index) U = U!.gatherRows(b.junction.index);
        u = u.add(U!);
      }
      return u;
    });
    const all = outs.length === 1 ? outs[0] : concatRows(outs);
    return points.order ? all.gatherRows(points.order) : all;
  }

  /** q = exp(u): ∂x q = q u_x, ∂xx q = q (u_xx + u_x²), ∂s q = q u_s. */
  q(points: PropagatorPoints): Jet {
    return this.logQ(points).exp();
  }

  dispose(): void {
    this.parameters.dispose();
  }
}

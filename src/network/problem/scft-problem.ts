/**
 * The physics-informed loss of one SCFT problem on a CPU-sized point set.
 *
 * Units: x in Rg, s ∈ [0, 1], fields in kT per chain. Equations: SCFT-NOTES.md; the
 * terms are in losses/. Points:
 *   - a fixed tensor grid (nx × contour nodes) for each propagator: it carries both the MDE
 *     residual and the Simpson quadrature of φ, so one forward pass with derivative
 *     channels gives every term; its features are prepared once;
 *   - a resampled set of extra MDE points per propagator, half uniform and half where the
 *     residual is largest (residual-based adaptive refinement; Lu, Meng, Mao & Karniadakis,
 *     SIAM Review 63, 208 (2021)), redrawn every `resampleEvery` steps from a seed derived
 *     from the resampling index, so a resumed run draws the same points;
 *   - with soft periodicity, the two ends x = 0 and x = L of each propagator at the grid's
 *     contour nodes (losses/periodicity.ts); with a soft initial condition, the grid's first
 *     row s = 0 carries losses/initial-condition.ts. With the exact forms both terms are an
 *     exact 0 (the networks satisfy them by construction).
 */
import type * as TfModule from '@tensorflow/tfjs';
import type { TrainConfig } from '../../io/schemas/train-config.js';
import type { SystemSpec } from '../../physics/chain-schema.js';
import type { Chain } from '../../physics/chain.js';
import { fieldAtPoints } from '../../physics/fields.js';
import type { Tf } from '../../autodiff/tf.js';
import { contourNodes, gridX, speciesAt } from '../contour-nodes.js';
import type { ContourNodes } from '../contour-nodes.js';
import type { Jet } from '../../autodiff/jet.js';
import { gridDensities } from '../losses/densities.js';
import { gaugeLoss, incompressibilityLoss, selfConsistencyLoss } from '../losses/field-equations.js';
import { initialConditionLoss } from '../losses/initial-condition.js';
import { mdeResidual } from '../losses/mde-residual.js';
import { periodicityLoss } from '../losses/periodicity.js';
import type { PropagatorNet, PropagatorPoints } from '../propagator-net.js';
import { childSeed, Xorshift128 } from '../../numerics/random.js';
import { stopGradient } from '../../autodiff/stop-gradient.js';
import type { ScftNetworks } from '../scft-networks.js';

export const LOSS_TERMS = ['mde', 'periodicity', 'initial', 'incompressibility', 'selfConsistency', 'gauge'] as const;
export type LossTerm = (typeof LOSS_TERMS)[number];
/** The terms of the propagator networks alone: what the alternating strategy trains on. */
export const PROPAGATOR_TERMS: readonly LossTerm[] = ['mde', 'periodicity', 'initial'];
export type LossValues = Record<LossTerm, number>;

/** Points of one propagator with their per-point constants. */
interface PointSet {
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

export class ScftProblem {
  readonly nodes: ContourNodes;
  readonly nodesReversed: ContourNodes;
  readonly xGrid: Float64Array;
  readonly chiN: number;
  readonly species: number;
  private gridQ!: PointSet;
  private gridQDagger!: PointSet;
  private extraQ: PointSet | null = null;
  private extraQDagger: PointSet | null = null;
  private readonly weightsA: TfModule.Tensor;
  private readonly weightsB: TfModule.Tensor;
  private readonly gridFieldFeatures: Jet | null;
  /** Soft periodicity: the points (0, s_i) then (L, s_i) at the grid's contour nodes, per propagator. */
  private readonly ends: { q: PropagatorPoints; qDagger: PropagatorPoints } | null;
  /** Grid and extra points of each propagator as one set (one network pass per step), for the current extras. */
  private merged: { for: PointSet; q: PointSet; qDagger: PointSet } | null = null;
  /** Index of the current resampling (−1: none drawn yet). */
  resamplings = -1;

  constructor(
    readonly tf: Tf,
    readonly nets: ScftNetworks,
    readonly system: SystemSpec,
    readonly collocation: TrainConfig['collocation'],
    public fieldInMde: TrainConfig['losses']['fieldInMde'] = 'detached',
  ) {
    this.chiN = system.chiN;
    this.species = nets.chain.species.length;
    const nb = collocation.nodesPerBlock;
    this.nodes = contourNodes(nets.chain, nb);
    this.nodesReversed = contourNodes(nets.reversed, nb);
    this.xGrid = gridX(nets.length, collocation.nx);
    const nx = collocation.nx;
    const nn = this.nodes.s.length;
    const xs = new Float64Array(nn * nx);
    const ss = new Float64Array(nn * nx);
    const ssR = new Float64Array(nn * nx);
    for (let i = 0; i < nn; i++) {
      for (let j = 0; j < nx; j++) {
        xs[i * nx + j] = this.xGrid[j];
        ss[i * nx + j] = this.nodes.s[i];
        ssR[i * nx + j] = this.nodesReversed.s[i];
      }
    }
    this.weightsA = tf.keep(tf.tensor2d(Float32Array.from(this.nodes.weights.A), [1, nn]));
    this.weightsB = tf.keep(tf.tensor2d(Float32Array.from(this.nodes.weights.B), [1, nn]));
    this.gridFieldFeatures = nets.field ? nets.field.features(this.xGrid, false) : null;
    this.gridQ = this.pointSet(nets.q, nets.chain, xs, ss);
    this.gridQDagger = this.pointSet(nets.qDagger, nets.reversed, xs, ssR);
    const atEnds = (net: PropagatorNet, sNodes: Float64Array) => {
      const x = Float64Array.from({ length: 2 * nn }, (_, i) => (i < nn ? 0 : nets.length));
      return net.prepare(x, Float64Array.from({ length: 2 * nn }, (_, i) => sNodes[i % nn]), true);
    };
    this.ends = nets.q.config.periodicity === 'soft' ? { q: atEnds(nets.q, this.nodes.s), qDagger: atEnds(nets.qDagger, this.nodesReversed.s) } : null;
  }

  /** Whether term k depends on the parameters here (an exact-form or absent term is a constant 0). */
  isActive(k: LossTerm): boolean {
    if (k === 'mde') return true;
    if (k === 'periodicity') return this.ends !== null;
    if (k === 'initial') return this.nets.q.config.initialCondition === 'soft';
    if (!this.nets.field) return false;
    return this.species > 1 || k !== 'selfConsistency';
  }

  private pointSet(net: PropagatorNet, chain: Chain, x: Float64Array, s: Float64Array): PointSet {
    const tf = this.tf;
    const n = x.length;
    const D = new Float32Array(n);
    const mA = new Float32Array(n);
    for (let i = 0; i < n; i++) {
      const at = speciesAt(chain, s[i]);
      D[i] = at.diffusivity;
      mA[i] = at.species === 'A' ? 1 : 0;
    }
    const points = net.prepare(x, s, true);
    const diffusivity = tf.keep(tf.tensor2d(D, [n, 1]));
    const maskA = tf.keep(tf.tensor2d(mA, [n, 1]));
    const fieldFeatures = this.nets.field ? this.nets.field.features(x, false) : null;
    let prescribedW: TfModule.Tensor | null = null;
    if (!this.nets.field) {
      const ext = this.system.externalField;
      const wA = ext?.A ? fieldAtPoints(ext.A, this.nets.length, x) : new Float64Array(n);
      const wB = ext?.B ? fieldAtPoints(ext.B, this.nets.length, x) : new Float64Array(n);
      prescribedW = tf.keep(tf.tensor2d(Float32Array.from(wA, (v, i) => (mA[i] ? v : wB[i])), [n, 1]));
    }
    return {
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

  /**
   * With frozen fields (the alternating strategy: the field network changes only at field
   * updates) the field at each point set is the same every step, so it is computed once
   * and kept until invalidateFields(). The kept tensor is a constant: no gradient reaches
   * the field network through it, exactly as with the detached form.
   */
  fieldsFrozen = false;
  private readonly frozenFields = new Map<PointSet, TfModule.Tensor>();

  invalidateFields(): void {
    for (const t of this.frozenFields.values()) t.dispose();
    this.frozenFields.clear();
  }

  /** w of the block at each point of a set: [n, 1]. */
  private pointField(set: PointSet): TfModule.Tensor {
    const tf = this.tf;
    if (set.prescribedW) return set.prescribedW;
    if (this.fieldsFrozen) {
      let w = this.frozenFields.get(set);
      if (!w) {
        w = tf.keep(tf.tidy(() => stopGradient(tf, this.fieldAtPoints(set))));
        this.frozenFields.set(set, w);
      }
      return w;
    }
    return this.fieldAtPoints(set);
  }

  private fieldAtPoints(set: PointSet): TfModule.Tensor {
    const tf = this.tf;
    const wNet = this.nets.field!.forward(set.fieldFeatures!).v;
    const w = this.fieldInMde === 'detached' ? stopGradient(tf, wNet) : wNet;
    const wA = tf.slice(w, [0, 0], [-1, 1]);
    const wB = tf.slice(w, [0, 1], [-1, 1]);
    return tf.add(tf.mul(set.maskA, wA), tf.mul(tf.sub(1, set.maskA), wB));
  }

  private residual(net: PropagatorNet, set: PointSet): TfModule.Tensor {
    return mdeResidual(this.tf, net.logQ(set.points), set.diffusivity, this.pointField(set));
  }

  /** The merged (grid + extra) point sets for the current extra points, built once per resampling. */
  private mergedSets(): [PropagatorNet, PointSet][] | null {
    if (!this.extraQ || !this.extraQDagger) return null;
    if (this.merged?.for !== this.extraQ) {
      this.disposeMerged();
      const join = (net: PropagatorNet, chain: Chain, grid: PointSet, extra: PointSet) => {
        const x = new Float64Array(grid.x.length + extra.x.length);
        const s = new Float64Array(x.length);
        x.set(grid.x);
        x.set(extra.x, grid.x.length);
        s.set(grid.s);
        s.set(extra.s, grid.s.length);
        return this.pointSet(net, chain, x, s);
      };
      this.merged = {
        for: this.extraQ,
        q: join(this.nets.q, this.nets.chain, this.gridQ, this.extraQ),
        qDagger: join(this.nets.qDagger, this.nets.reversed, this.gridQDagger, this.extraQDagger),
      };
    }
    return [
      [this.nets.q, this.merged.q],
      [this.nets.qDagger, this.merged.qDagger],
    ];
  }

  private disposeMerged(): void {
    if (!this.merged) return;
    for (const set of [this.merged.q, this.merged.qDagger]) {
      this.frozenFields.get(set)?.dispose();
      this.frozenFields.delete(set);
      set.dispose();
    }
    this.merged = null;
  }

  /**
   * Every loss term as a scalar tensor (call inside tf.tidy or variableGrads). With
   * gridMde false the MDE term covers only the extra points (a fresh set in evaluation).
   * With propagatorOnly the field-equation terms are returned as 0 (not computed).
   */
  terms(gridMde = true, propagatorOnly = false): Record<LossTerm, TfModule.Scalar> {
    const tf = this.tf;
    const nets = this.nets;
    const nx = this.collocation.nx;
    const nn = this.nodes.s.length;
    const squares: TfModule.Tensor[] = [];
    let uq: TfModule.Tensor;
    let uqd: TfModule.Tensor;
    const merged = gridMde ? this.mergedSets() : null;
    if (merged) {
      // One pass per propagator over grid and extra points together (rows: grid first).
      const nGrid = this.gridQ.x.length;
      const all = merged.map(([net, set]) => {
        const u = net.logQ(set.points);
        squares.push(tf.square(mdeResidual(tf, u, set.diffusivity, this.pointField(set))));
        return tf.slice(u.v, [0, 0], [nGrid, -1]);
      });
      [uq, uqd] = all;
    } else {
      const gq = nets.q.logQ(this.gridQ.points);
      const gqd = nets.qDagger.logQ(this.gridQDagger.points);
      if (gridMde) {
        squares.push(tf.square(mdeResidual(tf, gq, this.gridQ.diffusivity, this.pointField(this.gridQ))));
        squares.push(tf.square(mdeResidual(tf, gqd, this.gridQDagger.diffusivity, this.pointField(this.gridQDagger))));
      }
      if (this.extraQ) squares.push(tf.square(this.residual(nets.q, this.extraQ)));
      if (this.extraQDagger) squares.push(tf.square(this.residual(nets.qDagger, this.extraQDagger)));
      [uq, uqd] = [gq.v, gqd.v];
    }
    const mde = tf.mean(tf.concat(squares.map((t) => tf.reshape(t, [-1])), 0)) as TfModule.Scalar;
    const zero = tf.scalar(0);
    const periodicity = this.ends
      ? (tf.mul(tf.add(periodicityLoss(tf, nets.q.logQ(this.ends.q)), periodicityLoss(tf, nets.qDagger.logQ(this.ends.qDagger))), 0.5) as TfModule.Scalar)
      : zero;
    // Row 0 of each grid is s = 0 (contour-nodes.ts).
    const initial = this.isActive('initial') ? initialConditionLoss(tf, tf.concat([tf.slice(uq, [0, 0], [nx, -1]), tf.slice(uqd, [0, 0], [nx, -1])], 0)) : zero;
    const own = { mde, periodicity, initial };
    // The alternating strategy trains on the propagator terms alone: skip the density quadrature then.
    if (!nets.field || propagatorOnly) return { ...own, incompressibility: zero, selfConsistency: zero, gauge: zero };

    const dens = gridDensities(tf, uq, uqd, nn, nx, this.weightsA, this.weightsB);
    const w = nets.field.forward(this.gridFieldFeatures!).v;
    const wA = tf.reshape(tf.slice(w, [0, 0], [-1, 1]), [1, nx]);
    const wB = tf.reshape(tf.slice(w, [0, 1], [-1, 1]), [1, nx]);
    if (this.species === 1) {
      const only = nets.chain.species[0];
      const phi = only === 'A' ? dens.phiA : dens.phiB;
      return { ...own, incompressibility: incompressibilityLoss(tf, phi, null), selfConsistency: zero, gauge: gaugeLoss(tf, 0, only === 'A' ? wA : wB, null) };
    }
    return {
      ...own,
      incompressibility: incompressibilityLoss(tf, dens.phiA, dens.phiB),
      selfConsistency: selfConsistencyLoss(tf, this.chiN, wA, wB, dens.phiA, dens.phiB),
      gauge: gaugeLoss(tf, this.chiN, wA, wB),
    };
  }

  /** Weighted sum of the terms; term scalars are returned kept (dispose them). */
  total(weights: LossValues): { total: TfModule.Scalar; parts: Record<LossTerm, TfModule.Scalar> } {
    const tf = this.tf;
    const parts = this.terms();
    let total = tf.mul(parts.mde, weights.mde) as TfModule.Scalar;
    for (const k of LOSS_TERMS) if (k !== 'mde') total = tf.add(total, tf.mul(parts[k], weights[k])) as TfModule.Scalar;
    for (const k of LOSS_TERMS) tf.keep(parts[k]);
    return { total, parts };
  }

  /** Redraw the extra MDE points for resampling number `index` (deterministic in seed and index). */
  resample(index: number): void {
    const { random, residualShare, seed } = this.collocation;
    this.invalidateFields();
    this.disposeMerged();
    this.extraQ?.dispose();
    this.extraQDagger?.dispose();
    this.extraQ = null;
    this.extraQDagger = null;
    if (random === 0) return;
    const rng = new Xorshift128(childSeed(seed, index));
    this.extraQ = this.drawSet(this.nets.q, this.nets.chain, rng, random, residualShare);
    this.extraQDagger = this.drawSet(this.nets.qDagger, this.nets.reversed, rng, random, residualShare);
    this.resamplings = index;
  }

  private drawSet(net: PropagatorNet, chain: Chain, rng: Xorshift128, count: number, residualShare: number): PointSet {
    const L = this.nets.length;
    const nResidual = Math.round(count * residualShare);
    const nUniform = count - nResidual;
    const pool = 4 * nResidual;
    const xs = new Float64Array(nUniform + pool);
    const ss = new Float64Array(nUniform + pool);
    for (let i = 0; i < xs.length; i++) {
      xs[i] = rng.next() * L;
      ss[i] = rng.next();
    }
    if (nResidual === 0) return this.pointSet(net, chain, xs, ss);
    // Score the candidate pool by |r| with the current networks and keep the worst.
    const candidates = this.pointSet(net, chain, xs.subarray(nUniform), ss.subarray(nUniform));
    const rt = this.tf.tidy(() => this.tf.abs(this.residual(net, candidates)));
    const r = rt.dataSync() as Float32Array;
    rt.dispose();
    this.frozenFields.get(candidates)?.dispose();
    this.frozenFields.delete(candidates);
    candidates.dispose();
    const order = Array.from(r.keys()).sort((a, b) => r[b] - r[a] || a - b);
    const x = new Float64Array(count);
    const s = new Float64Array(count);
    x.set(xs.subarray(0, nUniform));
    s.set(ss.subarray(0, nUniform));
    for (let k = 0; k < nResidual; k++) {
      x[nUniform + k] = xs[nUniform + order[k]];
      s[nUniform + k] = ss[nUniform + order[k]];
    }
    return this.pointSet(net, chain, x, s);
  }

  /** Coordinates of the current extra MDE points (saved in checkpoints so a resume is exact). */
  extraPoints(): { q: { x: number[]; s: number[] }; qDagger: { x: number[]; s: number[] } } | null {
    if (!this.extraQ || !this.extraQDagger) return null;
    const grab = (p: PointSet) => ({ x: Array.from(p.x), s: Array.from(p.s) });
    return { q: grab(this.extraQ), qDagger: grab(this.extraQDagger) };
  }

  setExtraPoints(pts: { q: { x: number[]; s: number[] }; qDagger: { x: number[]; s: number[] } }, index: number): void {
    this.invalidateFields();
    this.disposeMerged();
    this.extraQ?.dispose();
    this.extraQDagger?.dispose();
    this.extraQ = this.pointSet(this.nets.q, this.nets.chain, Float64Array.from(pts.q.x), Float64Array.from(pts.q.s));
    this.extraQDagger = this.pointSet(this.nets.qDagger, this.nets.reversed, Float64Array.from(pts.qDagger.x), Float64Array.from(pts.qDagger.s));
    this.resamplings = index;
  }

  /** Loss terms on a fresh, seeded uniform point set (for evaluation); values in float. */
  freshResiduals(seed: number, count: number): LossValues {
    const saved = [this.extraQ, this.extraQDagger];
    this.invalidateFields();
    const rng = new Xorshift128(seed);
    this.extraQ = this.drawSet(this.nets.q, this.nets.chain, rng, count, 0);
    this.extraQDagger = this.drawSet(this.nets.qDagger, this.nets.reversed, rng, count, 0);
    const out = this.tf.tidy(() => {
      const t = this.terms(false);
      return Object.fromEntries(LOSS_TERMS.map((k) => [k, t[k].dataSync()[0]])) as LossValues;
    });
    this.extraQ.dispose();
    this.invalidateFields();
    this.extraQDagger.dispose();
    [this.extraQ, this.extraQDagger] = saved;
    return out;
  }

  dispose(): void {
    this.invalidateFields();
    this.disposeMerged();
    this.gridQ.dispose();
    if (!this.nets.shared || this.gridQDagger !== this.gridQ) this.gridQDagger.dispose();
    this.extraQ?.dispose();
    this.extraQDagger?.dispose();
    this.weightsA.dispose();
    this.weightsB.dispose();
    this.gridFieldFeatures?.dispose();
    this.ends?.q.dispose();
    this.ends?.qDagger.dispose();
  }
}

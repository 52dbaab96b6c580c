/**
 * The physics-informed loss of one SCFT problem on a CPU-sized point set: the terms of
 * losses/terms.ts evaluated on
 *   - the fixed tensor grid of each propagator (tensor-grid.ts), which carries both the MDE
 *     residual and the Simpson quadrature of φ, and with soft periodicity the cell's ends;
 *   - the extra MDE points, redrawn every `resampleEvery` steps (extra-points.ts), in one
 *     network pass with the grid (merged-points.ts);
 * with the field the MDE sees at each point from point-fields.ts (kept between field updates
 * when frozen). With the exact forms of periodicity and the initial condition those terms
 * are an exact 0 (the networks satisfy them by construction).
 *
 * Units: x in Rg, s ∈ [0, 1], fields in kT per chain. Equations: docs/physics.md.
 */
import type * as TfModule from '@tensorflow/tfjs';
import type { Tf } from '../../autodiff/tf.js';
import type { TrainConfig } from '../../io/schemas/train-config.js';
import type { SystemSpec } from '../../physics/chain-schema.js';
import { childSeed, Xorshift128 } from '../../numerics/random.js';
import type { Contour } from '../../physics/contour.js';
import { gridDensities } from '../losses/densities.js';
import { mdeResidual } from '../losses/mde-residual.js';
import { fieldEquationTerms, initialTerm, LOSS_TERMS, mdeTerm, periodicityTerm, weightedTotal } from '../losses/terms.js';
import type { LossTensors, LossTerm, LossValues } from '../losses/terms.js';
import type { ScftNetworks } from '../scft-networks.js';
import { drawPoints, ExtraPoints } from './extra-points.js';
import type { ExtraCoordinates } from './extra-points.js';
import { MergedPoints } from './merged-points.js';
import { PointFields } from './point-fields.js';
import { preparePointSet, sideOf } from './point-set.js';
import type { PointSet, Side } from './point-set.js';
import { TensorGrid } from './tensor-grid.js';

type Tensor = TfModule.Tensor;
type ExtraSets = { q: PointSet; qDagger: PointSet };

export class ScftProblem {
  readonly chiN: number;
  readonly species: number;
  private readonly grid: TensorGrid;
  private readonly fields: PointFields;
  private readonly extra = new ExtraPoints();
  private readonly merged: MergedPoints;

  constructor(
    readonly tf: Tf,
    readonly nets: ScftNetworks,
    readonly system: SystemSpec,
    readonly collocation: TrainConfig['collocation'],
    fieldInMde: TrainConfig['losses']['fieldInMde'] = 'detached',
  ) {
    this.chiN = system.chiN;
    this.species = nets.chain.species.length;
    this.grid = new TensorGrid(tf, nets, system, collocation.nx, collocation.nodesPerBlock, collocation.contourSpread);
    this.fields = new PointFields(tf, nets, fieldInMde);
    this.merged = new MergedPoints(tf, nets, system, this.fields);
  }

  get nodes(): Contour {
    return this.grid.nodes;
  }

  get nodesReversed(): Contour {
    return this.grid.nodesReversed;
  }

  get xGrid(): Float64Array {
    return this.grid.x;
  }

  /** Index of the current resampling (−1: none drawn yet). */
  get resamplings(): number {
    return this.extra.index;
  }

  /** Keep the field at each point set between steps (the alternating strategy; see point-fields.ts). */
  get fieldsFrozen(): boolean {
    return this.fields.frozen;
  }

  set fieldsFrozen(on: boolean) {
    this.fields.frozen = on;
  }

  /** The field network changed: recompute the kept fields. */
  invalidateFields(): void {
    this.fields.invalidate();
  }

  /** Whether term k depends on the parameters here (an exact-form or absent term is a constant 0). */
  isActive(k: LossTerm): boolean {
    if (k === 'mde') return true;
    if (k === 'periodicity') return this.grid.ends !== null;
    if (k === 'initial') return this.nets.q.config.initialCondition === 'soft';
    if (!this.nets.field) return false;
    return this.species > 1 || k !== 'selfConsistency';
  }

  /**
   * Every loss term as a scalar tensor (call inside tf.tidy or variableGrads). With
   * gridMde false the MDE term covers only the extra points (a fresh set in evaluation).
   * With propagatorOnly the field-equation terms are returned as 0 (not computed).
   */
  terms(gridMde = true, propagatorOnly = false): LossTensors {
    return this.termsOn(this.extra.current(), gridMde, propagatorOnly);
  }

  /** Weighted sum of the terms; term scalars are returned kept (dispose them). */
  total(weights: LossValues): { total: TfModule.Scalar; parts: LossTensors } {
    const parts = this.terms();
    const total = weightedTotal(this.tf, parts, weights);
    for (const k of LOSS_TERMS) this.tf.keep(parts[k]);
    return { total, parts };
  }

  /** Redraw the extra MDE points for resampling number `index` (deterministic in seed and index). */
  resample(index: number): void {
    const { random, residualShare, seed } = this.collocation;
    this.fields.invalidate();
    this.merged.dispose();
    if (random === 0) {
      // No extra points: nothing is drawn, and the index stays (the loop asks again, harmlessly).
      this.extra.replace(null, this.extra.index);
      return;
    }
    this.extra.dispose();
    const rng = new Xorshift128(childSeed(seed, index));
    const q = this.drawSet('q', rng, random, residualShare);
    const qDagger = this.drawSet('qDagger', rng, random, residualShare);
    this.extra.replace({ q, qDagger }, index);
  }

  /** Coordinates of the current extra MDE points (saved in checkpoints so a resume is exact). */
  extraPoints(): ExtraCoordinates | null {
    return this.extra.coordinates();
  }

  setExtraPoints(pts: ExtraCoordinates, index: number): void {
    this.fields.invalidate();
    this.merged.dispose();
    this.extra.dispose();
    const set = (side: Side) => preparePointSet(this.tf, this.nets, this.system, side, Float64Array.from(pts[side].x), Float64Array.from(pts[side].s));
    const q = set('q');
    this.extra.replace({ q, qDagger: set('qDagger') }, index);
  }

  /** Loss terms on a fresh, seeded uniform point set (for evaluation); values in float. */
  freshResiduals(seed: number, count: number): LossValues {
    this.fields.invalidate();
    const rng = new Xorshift128(seed);
    const fresh = { q: this.drawSet('q', rng, count, 0), qDagger: this.drawSet('qDagger', rng, count, 0) };
    const out = this.tf.tidy(() => {
      const t = this.termsOn(fresh, false, false);
      return Object.fromEntries(LOSS_TERMS.map((k) => [k, t[k].dataSync()[0]])) as LossValues;
    });
    fresh.q.dispose();
    this.fields.invalidate();
    fresh.qDagger.dispose();
    return out;
  }

  dispose(): void {
    this.fields.invalidate();
    this.merged.dispose();
    this.grid.dispose();
    this.extra.dispose();
  }

  /** r, the MDE residual of a side's network at the points of `set`. */
  private residual(set: PointSet): Tensor {
    const { net } = sideOf(this.nets, set.side);
    return mdeResidual(this.tf, net.logQ(set.points), set.diffusivity, this.fields.at(set));
  }

  /** A set of extra points drawn from rng (see extra-points.ts), scored by the current networks. */
  private drawSet(side: Side, rng: Xorshift128, count: number, residualShare: number): PointSet {
    const { tf, nets, system } = this;
    const score = (x: Float64Array, s: Float64Array) => {
      const candidates = preparePointSet(tf, nets, system, side, x, s);
      const rt = tf.tidy(() => tf.abs(this.residual(candidates)));
      const r = rt.dataSync() as Float32Array;
      rt.dispose();
      this.fields.forget(candidates);
      candidates.dispose();
      return r;
    };
    const { x, s } = drawPoints(rng, nets.length, count, residualShare, score);
    return preparePointSet(tf, nets, system, side, x, s);
  }

  /**
   * ln q and ln q† on the grid ([rows·nx, 1] each) and the MDE residuals of every point the
   * mde term covers: the grid (when gridMde) and the extra points, merged into one network
   * pass per propagator when there are both.
   */
  private propagatorPass(extra: ExtraSets | null, gridMde: boolean): { uq: Tensor; uqDagger: Tensor; residuals: Tensor[] } {
    const { tf, nets, grid } = this;
    const residuals: Tensor[] = [];
    if (gridMde && extra) {
      const nGrid = grid.q.x.length;
      const [uq, uqDagger] = this.merged.of(grid, extra).map((set) => {
        const { net } = sideOf(nets, set.side);
        const u = net.logQ(set.points);
        residuals.push(mdeResidual(tf, u, set.diffusivity, this.fields.at(set)));
        return tf.slice(u.v, [0, 0], [nGrid, -1]);
      });
      return { uq, uqDagger, residuals };
    }
    const gq = nets.q.logQ(grid.q.points);
    const gqd = nets.qDagger.logQ(grid.qDagger.points);
    if (gridMde) {
      residuals.push(mdeResidual(tf, gq, grid.q.diffusivity, this.fields.at(grid.q)));
      residuals.push(mdeResidual(tf, gqd, grid.qDagger.diffusivity, this.fields.at(grid.qDagger)));
    }
    if (extra) residuals.push(this.residual(extra.q), this.residual(extra.qDagger));
    return { uq: gq.v, uqDagger: gqd.v, residuals };
  }

  private termsOn(extra: ExtraSets | null, gridMde: boolean, propagatorOnly: boolean): LossTensors {
    const { tf, nets, grid } = this;
    const nx = grid.nx;
    const { uq, uqDagger, residuals } = this.propagatorPass(extra, gridMde);
    const mde = mdeTerm(tf, residuals);
    const zero = tf.scalar(0);
    const periodicity = grid.ends ? periodicityTerm(tf, nets.q.logQ(grid.ends.q), nets.qDagger.logQ(grid.ends.qDagger)) : zero;
    // Row 0 of each grid is s = 0 (physics/contour.ts).
    const atStart = (u: Tensor) => tf.slice(u, [0, 0], [nx, -1]);
    const initial = this.isActive('initial') ? initialTerm(tf, atStart(uq), atStart(uqDagger)) : zero;
    const own = { mde, periodicity, initial };
    // The alternating strategy trains on the propagator terms alone: skip the density quadrature then.
    if (!nets.field || propagatorOnly) return { ...own, incompressibility: zero, selfConsistency: zero, gauge: zero };

    const dens = gridDensities(tf, uq, uqDagger, grid.rows, nx, grid.weightsA, grid.weightsB);
    const w = nets.field.forward(grid.fieldFeatures!).v;
    const wA = tf.reshape(tf.slice(w, [0, 0], [-1, 1]), [1, nx]);
    const wB = tf.reshape(tf.slice(w, [0, 1], [-1, 1]), [1, nx]);
    return { ...own, ...fieldEquationTerms(tf, nets.chain.species, this.chiN, dens, wA, wB, zero, grid.surfaceField) };
  }
}

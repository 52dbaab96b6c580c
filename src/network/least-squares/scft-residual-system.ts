/**
 * The whole SCFT system of a network solution as one least-squares problem in float64, for
 * the second-order (Gauss–Newton) phase of a train run. The residuals are the loss terms of
 * losses/terms.ts, each scaled so that Σ r² equals their weighted total:
 *
 *   mde               √(w_mde/N) · r(x_j, s_i),  r = ∂u/∂s − D(∂²u/∂x² + (∂u/∂x)²) + w,
 *                     u = ln q, at every node s_i of every block (a junction once per block
 *                     it bounds, each side with its own D and w) × the cell grid x_j,
 *                     for q and for q† (once when they share a network); N the point count
 *   incompressibility √(w_inc/nx) · (φ_A + φ_B − 1)(x_j)              (one species: φ_K − 1)
 *   selfConsistency   √(w_sc/nx) · (w_A − w_B − χN (φ_B − φ_A) + 2h)(x_j) / max(1, χN)
 *                     (h: a film's surface field, 0 in a periodic cell)
 *   gauge             √w_g · mean_j (w_A + w_B)/2 / max(1, χN)         (one species: mean w_K)
 * with φ from physics/contour.ts (Simpson weights, densitiesFromPropagators) on the same
 * tensor grid, and the field network's w (or the prescribed field of a single chain). The
 * field network is a parameter block of the same problem: it trains jointly with the
 * propagators (no field-update refits).
 *
 * Jacobian: per point, by the float64 jet MLP (autodiff/jet-mlp64.ts), one reverse pass of
 * the residual's channel combination (ā_s = 1, ā_xx = −D, ā_x = −2D ∂x u) and one of the
 * value (for φ). The junction terms U_k(x) = Σ_{j<k} Δ_j n_j(x, 1) (propagator-net.ts)
 * depend on x alone, so their channel gradients are formed once per x and combined per
 * point; likewise ∂w(x_j)/∂θ. The density rows follow from the tangent of the quadrature,
 *   dφ_K(x_j) = (1/Q) Σ_i c^K_i P_ij (du_ij + du†_{ns−i,j}) − φ_K(x_j) dQ/Q,
 *   dQ = mean_j q(x_j, 1) du_{ns,j},  P_ij = q(x_j, s_i) q†(x_j, 1 − s_i),
 * with the same weights c^K. Rows come in groups (numerics/grouped-normal-equations.ts):
 * the MDE rows of one block touch the field network and that side's pieces up to the block.
 *
 * Units: x in Rg, s ∈ [0, 1], w in kT per chain. Equations: docs/physics.md.
 */
import { InputError } from '../../io/errors.js';
import type { SystemSpec } from '../../physics/chain-schema.js';
import type { Chain } from '../../physics/chain.js';
import { collocationContours, densitiesFromPropagators } from '../../physics/contour.js';
import type { Contour, ContourSpread } from '../../physics/contour.js';
import { fieldAtPoints } from '../../physics/fields.js';
import { JetMlp64 } from '../../autodiff/jet-mlp64.js';
import type { Mlp } from '../../autodiff/mlp.js';
import { groupsOnColumns } from '../../numerics/column-subset.js';
import { groupedGradient, groupedNormalEquations, shiftedGroups } from '../../numerics/grouped-normal-equations.js';
import type { ResidualGroup } from '../../numerics/grouped-normal-equations.js';
import type { LeastSquaresProblem } from '../../numerics/levenberg-marquardt.js';
import type { SpeciesArrays } from '../../physics/fields.js';
import { cellFeatureArrays } from '../features.js';
import type { LossValues } from '../losses/terms.js';
import type { ScftNetworks } from '../scft-networks.js';

export interface ResidualGrid {
  /** Cell grid points (the MDE and the field equations share them). */
  nx: number;
  /** Contour steps per block (even); with spread 'by-length', the mean over the blocks. */
  nodesPerBlock: number;
  /** How the steps are spread over the blocks (physics/contour.ts; absent: 'equal'). */
  spread?: ContourSpread;
}

interface Piece {
  start: number;
  length: number;
  mlp: JetMlp64;
}

interface Side {
  name: 'q' | 'qDagger';
  chain: Chain;
  contour: Contour;
  pieces: Piece[];
  /** Global columns of all this side's pieces (contiguous), and of pieces 0..p. */
  first: number;
  count: number;
  upTo: number[];
  /** Per chain block: the piece that carries it. */
  pieceOfBlock: number[];
  /** Prescribed w at (block, x_j) for a chain without a field network. */
  prescribed: Float64Array[] | null;
}

/**
 * Which part of the system an evaluation covers: everything (the field network joint), or
 * the MDE of one propagator in the field network's current w (its parameters held fixed:
 * the rows then touch that propagator's columns only, and q and q† are independent).
 */
export type ResidualPart = 'all' | 'q' | 'qDagger';

export interface ResidualEvaluation {
  /** ½ Σ r²: half the weighted loss. */
  cost: number;
  /** The unweighted loss terms (mean squares as losses/terms.ts defines them). */
  terms: LossValues;
  groups?: ResidualGroup[];
  /**
   * With the Jacobian and keepDiffusionRows: for each MDE group (the first groups, in order), each row's diffusion
   * term as scaled in the row, mdeScale · D · lengthFactor · (u_xx + u_x²): the row's
   * derivative with respect to the cell length L is 2/L times it.
   */
  diffusionRows?: Float64Array[];
  /**
   * With the field network and part 'all': φ and w on the grid, and with the Jacobian the
   * tangent dφ_K(x_j)/dθ over all columns (for data rows added beside these residuals).
   */
  density?: { phi: SpeciesArrays; w: Float64Array[]; dphi: Record<'A' | 'B', Float64Array[]> | null };
}

/** Offset of each Mlp's first parameter in the flattened ParameterSet order. */
function offsetOf(nets: ScftNetworks, mlp: Mlp): number {
  let o = 0;
  for (const e of nets.parameters.entries) {
    if (e.variable === mlp.layers[0].kernel) return o;
    o += e.variable.size;
  }
  throw new Error(`network ${mlp.spec.name} is not in the parameter set`);
}

function jetOf(nets: ScftNetworks, mlp: Mlp): JetMlp64 {
  return new JetMlp64(mlp.spec.inputs, mlp.spec.hidden, mlp.spec.outputs, mlp.spec.activation, offsetOf(nets, mlp));
}

export class ScftResidualSystem {
  readonly size: number;
  readonly x: Float64Array;
  readonly nx: number;
  private readonly sides: Side[];
  private readonly shared: boolean;
  private readonly field: JetMlp64 | null;
  private readonly fieldFirst: number;
  private readonly fieldCount: number;
  private readonly featX: ReturnType<typeof cellFeatureArrays>;
  private readonly featField: ReturnType<typeof cellFeatureArrays> | null;
  /** The field network's surface-field offsets (−h, +h) on the grid, or null. */
  private readonly fieldOffset: Float64Array[] | null;
  /** A film's surface field h on the grid, or null. */
  private readonly surfaceField: Float64Array | null;
  /** χN of the self-consistency equation; the inverse problem (inverse/network-least-squares.ts) moves it between evaluations. */
  chiN: number;
  /**
   * (L₀/L)²: the cell stretched from the length it was built with, L₀, to L with the networks
   * unchanged as functions of x/L (their inputs are periodic features of x/L, so on the grid
   * x_j = j L/nx they see the same values): ∂x scales by L₀/L, so the MDE's diffusion term by
   * this factor. The inverse problem with a free period moves it; 1 otherwise.
   */
  lengthFactor = 1;
  /** Return each MDE row's diffusion term with the Jacobian (ResidualEvaluation.diffusionRows): only a free cell length needs them. */
  keepDiffusionRows = false;
  private readonly mdePoints: number;

  constructor(
    readonly nets: ScftNetworks,
    system: SystemSpec,
    grid: ResidualGrid,
    readonly weights: LossValues,
  ) {
    const prop = nets.q.config;
    if (prop.periodicity !== 'exact') throw new InputError(`networks.propagator.periodicity: got "soft"; the second-order phase needs "exact"`);
    if (prop.initialCondition !== 'exact') throw new InputError(`networks.propagator.initialCondition: got "soft"; the second-order phase needs "exact"`);
    this.size = nets.parameters.size;
    this.nx = grid.nx;
    this.x = nets.cell.withPoints(grid.nx).x;
    this.chiN = system.chiN;
    this.shared = nets.shared;
    this.surfaceField = nets.cell.surfaceFieldAt(this.x);
    this.fieldOffset = nets.field ? nets.field.offsetAt(this.x) : null;
    this.featX = cellFeatureArrays(this.x, nets.cell.features, prop.fourierModes);
    this.field = nets.field ? jetOf(nets, nets.field.mlp) : null;
    this.fieldFirst = this.field ? this.field.offset : 0;
    this.fieldCount = this.field ? this.field.size : 0;
    this.featField = nets.field ? cellFeatureArrays(this.x, nets.cell.features, nets.field.config.fourierModes) : null;
    const contours = collocationContours(nets.chain, nets.reversed, grid.nodesPerBlock, grid.spread ?? 'equal', 'training.secondOrder.nodesPerBlock');
    const makeSide = (name: Side['name'], chain: Chain): Side => {
      const net = name === 'q' ? nets.q : nets.qDagger;
      const pieces = net.pieces.map((p) => ({ start: p.start, length: p.length, mlp: jetOf(nets, p.mlp) }));
      const first = pieces[0].mlp.offset;
      const upTo = pieces.map((p) => p.mlp.offset + p.mlp.size - first);
      const mid = (b: Chain['blocks'][number]) => 0.5 * (b.start + b.end);
      const pieceOfBlock = chain.blocks.map((b) => {
        const m = mid(b);
        const k = pieces.findIndex((p) => m >= p.start && m <= p.start + p.length);
        return k < 0 ? 0 : k;
      });
      let prescribed: Float64Array[] | null = null;
      if (!nets.field) {
        const ext = system.externalField;
        prescribed = chain.blocks.map((b) => {
          const spec = ext?.[b.species];
          return spec ? fieldAtPoints(spec, nets.length, this.x) : new Float64Array(this.nx);
        });
      }
      return { name, chain, contour: name === 'q' ? contours.q : contours.qDagger, pieces, first, count: upTo[upTo.length - 1], upTo, pieceOfBlock, prescribed };
    };
    this.sides = [makeSide('q', nets.chain), makeSide('qDagger', nets.reversed)];
    const mdeSides = this.shared ? 1 : 2;
    this.mdePoints = mdeSides * contours.q.blocks.reduce((s, b) => s + (b.steps + 1) * grid.nx, 0);
  }

  /** ½‖r‖² (no Jacobian). */
  cost(theta: Float64Array): number {
    return this.evaluate(theta, false).cost;
  }

  /**
   * φ (Simpson quadrature of physics/contour.ts) and the field network's w on the phase's grid
   * at theta, in float64: the input of an SCFT field update.
   */
  state(theta: Float64Array): { phi: SpeciesArrays; w: SpeciesArrays; Q: number } {
    const field = this.field ? this.fieldAt(theta, false) : null;
    const u = this.sides.map((side) => this.sideResiduals(theta, side, field, false, false, 0, false).u);
    const q = u[0].map((r) => r.map(Math.exp));
    const qd = u[1].map((r) => r.map(Math.exp));
    const ns = this.sides[0].contour.ns;
    const Q = q[ns].reduce((a, b) => a + b, 0) / this.nx;
    const phi = densitiesFromPropagators(this.sides[0].contour, q, qd, Q);
    return { phi, w: { A: field ? field.w[0] : new Float64Array(this.nx), B: field ? field.w[1] : new Float64Array(this.nx) }, Q };
  }

  /**
   * ln q and ln q† on the contour nodes × grid, and each block's MDE residual r (unscaled,
   * at that block's own nodes, a junction node once per block with the block's D and w), at
   * theta in float64: what the adjoint correction of Q needs (network/partition-function.ts).
   */
  propagatorResiduals(theta: Float64Array): { w: SpeciesArrays | null; sides: { contour: Contour; logQ: Float64Array[]; residual: Float64Array[] }[] } {
    const field = this.field ? this.fieldAt(theta, false) : null;
    const sides = this.sides.map((side) => {
      const out = this.computeSide(theta, side, field, true, false, 1, false);
      return { contour: side.contour, logQ: out.u, residual: out.blockResiduals };
    });
    return { w: field ? { A: field.w[0], B: field.w[1] } : null, sides };
  }

  /**
   * The field network fitted to target fields on the grid, as least squares over its own
   * columns: r_{c,j} = (w_c(x_j) − target_c(x_j)) / √(2 nx) for the species on the chain.
   */
  fieldFit(theta: Float64Array, target: SpeciesArrays): LeastSquaresProblem & { first: number } {
    if (!this.field) throw new Error('fieldFit: the networks have no field network');
    const first = this.fieldFirst;
    const count = this.fieldCount;
    const species = this.nets.chain.species.map((k) => (k === 'A' ? 0 : 1));
    const scale = 1 / Math.sqrt(species.length * this.nx);
    const embed = (xs: Float64Array) => {
      const full = Float64Array.from(theta);
      full.set(xs, first);
      return full;
    };
    const residuals = (xs: Float64Array, jacobian: boolean) => {
      const f = this.fieldAt(embed(xs), jacobian);
      const m = species.length * this.nx;
      const r = new Float64Array(m);
      const J = jacobian ? new Float64Array(m * count) : null;
      species.forEach((c, si) => {
        const t = c === 0 ? target.A : target.B;
        for (let j = 0; j < this.nx; j++) {
          const row = si * this.nx + j;
          r[row] = scale * (f.w[c][j] - t[j]);
          if (J) {
            const d = f.dw![c][j];
            for (let a = 0; a < count; a++) J[row * count + a] = scale * d[a];
          }
        }
      });
      return { r, J, m };
    };
    return denseProblem(first, count, residuals);
  }

  /**
   * One propagator network fitted to given ln q values at the contour nodes × grid points of
   * this system (target[node][j]), as least squares over that propagator's columns:
   * r_{i,j} = (u(x_j, s_i) − target_ij) / √N. Used to start from a reference solution.
   */
  propagatorFit(theta: Float64Array, side: 'q' | 'qDagger', target: Float64Array[]): LeastSquaresProblem & { first: number } {
    const sd = this.sides[side === 'q' ? 0 : 1];
    const first = sd.first;
    const count = sd.count;
    const nx = this.nx;
    const ns = sd.contour.ns;
    if (target.length !== ns + 1 || target[0].length !== nx) throw new RangeError(`propagatorFit: target is ${target.length} × ${target[0]?.length}, expected ${ns + 1} × ${nx}`);
    const scale = 1 / Math.sqrt((ns + 1) * nx);
    const field = this.field ? this.fieldAt(theta, false) : null;
    const embed = (xs: Float64Array) => {
      const full = Float64Array.from(theta);
      full.set(xs, first);
      return full;
    };
    const residuals = (xs: Float64Array, jacobian: boolean) => {
      const out = this.sideResiduals(embed(xs), sd, field, false, jacobian, 0, jacobian);
      const m = (ns + 1) * nx;
      const r = new Float64Array(m);
      const J = jacobian ? new Float64Array(m * count) : null;
      for (let i = 0; i <= ns; i++) {
        for (let j = 0; j < nx; j++) {
          const row = i * nx + j;
          r[row] = scale * (out.u[i][j] - target[i][j]);
          if (J) {
            const d = out.valueRows![row];
            for (let a = 0; a < d.length; a++) J[row * count + a] = scale * d[a];
          }
        }
      }
      return { r, J, m };
    };
    return denseProblem(first, count, residuals);
  }

  /** Contour nodes s_i of one side's propagator in this system (for propagatorFit targets). */
  contourOf(side: 'q' | 'qDagger'): Float64Array {
    return this.sides[side === 'q' ? 0 : 1].contour.s;
  }

  /** Global columns [first, first + count) of one propagator's parameters. */
  columnsOf(side: 'q' | 'qDagger'): { first: number; count: number } {
    const s = this.sides[side === 'q' ? 0 : 1];
    return { first: s.first, count: s.count };
  }

  /**
   * Least squares over one part's columns (the whole system, or one propagator's in the
   * current fields) with the other parameters held at `theta`, linearised through the grouped
   * normal equations; `embed` puts a part's values back into the whole parameter vector.
   */
  partProblem(theta: Float64Array, part: ResidualPart): LeastSquaresProblem & { first: number; embed: (xs: Float64Array) => Float64Array } {
    const { first, count } = part === 'all' ? { first: 0, count: this.size } : this.columnsOf(part);
    let last: ResidualGroup[] | null = null;
    const embed = (xs: Float64Array) => {
      if (part === 'all') return xs;
      const full = Float64Array.from(theta);
      full.set(xs, first);
      return full;
    };
    return {
      first,
      embed,
      size: count,
      cost: (xs) => this.evaluate(embed(xs), false, part).cost,
      linearise: (xs) => {
        const e = this.evaluate(embed(xs), true, part);
        last = shiftedGroups(e.groups!, first);
        const { A, g } = groupedNormalEquations(count, last);
        return { kind: 'normal', cost: e.cost, A, g };
      },
      // One propagator's rows are its blocks' MDE residuals, one group per block in order.
      ...(part === 'all' ? {} : { gradientWithLastJacobian: (xs: Float64Array) => groupedGradient(count, last!, this.blockResidualsOf(embed(xs), part)) }),
    };
  }

  /** The scaled MDE residuals of one propagator's blocks at theta (the rows of its part, in order). */
  private blockResidualsOf(theta: Float64Array, part: 'q' | 'qDagger'): Float64Array[] {
    const field = this.field ? this.fieldAt(theta, false) : null;
    const side = this.sides[part === 'q' ? 0 : 1];
    return this.sideResiduals(theta, side, field && { w: field.w, dw: null }, true, false, Math.sqrt(this.weights.mde / this.mdePoints), false).blockResiduals;
  }

  /**
   * Global columns of the output layers (last kernel and bias) of one propagator's pieces,
   * ascending: for fixed hidden layers the network is linear in them.
   */
  outputLayerColumns(side: 'q' | 'qDagger'): Int32Array {
    const cols: number[] = [];
    for (const p of this.sides[side === 'q' ? 0 : 1].pieces) {
      const w = p.mlp.widths;
      const n = (w[w.length - 2] + 1) * w[w.length - 1];
      for (let c = p.mlp.offset + p.mlp.size - n; c < p.mlp.offset + p.mlp.size; c++) cols.push(c);
    }
    return Int32Array.from(cols);
  }

  /**
   * One propagator's least squares (as partProblem) over a subset of its columns (`columns`,
   * global, ascending), the rest held at `theta`: the Jacobian is evaluated whole and
   * restricted (numerics/column-subset.ts), so only the normal matrix is smaller.
   */
  columnProblem(theta: Float64Array, side: 'q' | 'qDagger', columns: Int32Array): LeastSquaresProblem & { embed: (xs: Float64Array) => Float64Array } {
    const embed = (xs: Float64Array) => {
      const full = Float64Array.from(theta);
      columns.forEach((c, i) => (full[c] = xs[i]));
      return full;
    };
    return {
      embed,
      size: columns.length,
      cost: (xs) => this.evaluate(embed(xs), false, side).cost,
      linearise: (xs) => {
        const e = this.evaluate(embed(xs), true, side);
        const { A, g } = groupedNormalEquations(columns.length, groupsOnColumns(e.groups!, columns));
        return { kind: 'normal', cost: e.cost, A, g };
      },
    };
  }

  /** Residuals (cost, terms) of the part and, when asked, its Jacobian in groups of rows. */
  evaluate(theta: Float64Array, jacobian: boolean, part: ResidualPart = 'all'): ResidualEvaluation {
    const field = this.field ? this.fieldAt(theta, jacobian && part === 'all') : null;
    const groups: ResidualGroup[] = [];
    const mdeScale = Math.sqrt(this.weights.mde / this.mdePoints);
    let mdeSum = 0;
    const logQ: Float64Array[][] = [];
    const valueRows: (Float64Array[] | null)[] = [];
    const diffusionRows: Float64Array[] = [];
    for (const [si, side] of this.sides.entries()) {
      const withMde = part === 'all' ? si === 0 || !this.shared : part === side.name;
      if (part !== 'all' && !withMde) continue;
      const out = this.sideResiduals(theta, side, part === 'all' ? field : field && { w: field.w, dw: null }, withMde, jacobian, mdeScale, part === 'all' && field !== null);
      mdeSum += out.sumSq;
      groups.push(...out.groups);
      diffusionRows.push(...out.diffusion);
      logQ.push(out.u);
      valueRows.push(out.valueRows);
    }
    const terms: LossValues = { mde: mdeSum / this.mdePoints, periodicity: 0, initial: 0, incompressibility: 0, selfConsistency: 0, gauge: 0 };
    let sumSq = this.weights.mde * terms.mde;
    if (field && part === 'all') {
      const fe = this.fieldEquations(field, logQ, valueRows, jacobian);
      Object.assign(terms, fe.terms);
      sumSq += fe.weightedSum;
      if (fe.group) groups.push(fe.group);
      return { cost: 0.5 * sumSq, terms, ...(jacobian ? { groups, ...(this.keepDiffusionRows ? { diffusionRows } : {}) } : {}), density: { phi: fe.phi, w: field.w, dphi: fe.dphi } };
    }
    return { cost: 0.5 * sumSq, terms, ...(jacobian ? { groups, ...(this.keepDiffusionRows ? { diffusionRows } : {}) } : {}) };
  }

  /** w_A, w_B at the grid and (with the Jacobian) ∂w_c(x_j)/∂θ over the field network's columns. */
  private fieldAt(theta: Float64Array, jacobian: boolean): { w: Float64Array[]; dw: Float64Array[][] | null } {
    const mlp = this.field!;
    const f = this.featField!;
    const nx = this.nx;
    const w = [new Float64Array(nx), new Float64Array(nx)];
    const dw = jacobian ? [0, 1].map(() => Array.from({ length: nx }, () => new Float64Array(this.fieldCount))) : null;
    const scratch = new Float64Array(this.size);
    const seed = new Float64Array(4 * 2);
    for (let j = 0; j < nx; j++) {
      const y = mlp.forward(theta, { v: f.v.subarray(j * f.width, (j + 1) * f.width), dx: null, dxx: null, ds: null }, 'value');
      w[0][j] = y[0] + (this.fieldOffset ? this.fieldOffset[0][j] : 0);
      w[1][j] = y[1] + (this.fieldOffset ? this.fieldOffset[1][j] : 0);
      if (!dw) continue;
      for (let c = 0; c < 2; c++) {
        seed.fill(0);
        seed[c] = 1;
        scratch.fill(0, this.fieldFirst, this.fieldFirst + this.fieldCount);
        mlp.backward(theta, seed, scratch);
        dw[c][j].set(scratch.subarray(this.fieldFirst, this.fieldFirst + this.fieldCount));
      }
    }
    return { w, dw };
  }

  /** Input jet of a propagator piece at (x_j, σ): the periodic features of x_j, then σ. */
  private pieceInput(j: number, sigma: number, length: number, buf: { v: Float64Array; dx: Float64Array; dxx: Float64Array; ds: Float64Array }) {
    const f = this.featX;
    const w = f.width;
    buf.v.set(f.v.subarray(j * w, (j + 1) * w));
    buf.dx.set(f.dx.subarray(j * w, (j + 1) * w));
    buf.dxx.set(f.dxx.subarray(j * w, (j + 1) * w));
    buf.v[w] = sigma;
    buf.ds[w] = 1 / length;
    return buf;
  }

  /**
   * The last value-only evaluation of each side, keyed by its parameters and the field
   * network's: LM's trial cost of one propagator and the whole-system loss recorded after the
   * iteration are at the same parameters, and a propagator's solve leaves the other side's
   * unchanged, so the recorded loss costs the field equations only.
   */
  private readonly valueCache = new Map<Side, { key: Float64Array; out: ReturnType<ScftResidualSystem['computeSide']> }>();

  private cacheKey(theta: Float64Array, side: Side): Float64Array {
    const key = new Float64Array(side.count + this.fieldCount + 1);
    key.set(theta.subarray(side.first, side.first + side.count));
    if (this.fieldCount > 0) key.set(theta.subarray(this.fieldFirst, this.fieldFirst + this.fieldCount), side.count);
    key[key.length - 1] = this.lengthFactor;
    return key;
  }

  private sideResiduals(theta: Float64Array, side: Side, field: { w: Float64Array[]; dw: Float64Array[][] | null } | null, withMde: boolean, jacobian: boolean, mdeScale: number, values: boolean) {
    if (jacobian || !field || field.dw) return this.computeSide(theta, side, field, withMde, jacobian, mdeScale, values);
    const key = this.cacheKey(theta, side);
    const hit = this.valueCache.get(side);
    if (hit && hit.key.every((v, i) => v === key[i])) return hit.out;
    // Value-only evaluations compute the MDE sum always (cheap), so one entry serves every caller.
    const out = this.computeSide(theta, side, field, true, false, mdeScale, values);
    this.valueCache.set(side, { key, out });
    return out;
  }

  private computeSide(theta: Float64Array, side: Side, field: { w: Float64Array[]; dw: Float64Array[][] | null } | null, withMde: boolean, jacobian: boolean, mdeScale: number, values: boolean) {
    const nx = this.nx;
    const width = this.featX.width + 1;
    const buf = { v: new Float64Array(width), dx: new Float64Array(width), dxx: new Float64Array(width), ds: new Float64Array(width) };
    const P = side.pieces;
    // Junction terms per x: the channels of n_p(x_j, σ = 1) for p < last, and their gradients.
    const ends = P.map(() => ({ v: new Float64Array(nx), x: new Float64Array(nx), xx: new Float64Array(nx) }));
    const endGrad: Float64Array[][][] = P.map(() => []);
    const scratch = new Float64Array(this.size);
    const seed = new Float64Array(4);
    for (let p = 0; p + 1 < P.length; p++) {
      for (let j = 0; j < nx; j++) {
        const y = P[p].mlp.forward(theta, this.pieceInput(j, 1, P[p].length, buf), 'full');
        ends[p].v[j] = y[0];
        ends[p].x[j] = y[1];
        ends[p].xx[j] = y[2];
        if (!jacobian) continue;
        const grads: Float64Array[] = [];
        for (let c = 0; c < 3; c++) {
          seed.fill(0);
          seed[c] = 1;
          const lo = P[p].mlp.offset;
          scratch.fill(0, lo, lo + P[p].mlp.size);
          P[p].mlp.backward(theta, seed, scratch);
          grads.push(scratch.slice(lo, lo + P[p].mlp.size));
        }
        endGrad[p].push(grads);
      }
    }
    const ns = side.contour.ns;
    const u = Array.from({ length: ns + 1 }, () => new Float64Array(nx));
    // One buffer for all value rows, each row a view: thousands of separate row arrays (each
    // with a store of its own) made the garbage collector a tenth of the estimator's time.
    const valueStore = jacobian && values ? new Float64Array((ns + 1) * nx * side.count) : null;
    const valueRows = valueStore ? Array.from({ length: (ns + 1) * nx }, (_, r) => valueStore.subarray(r * side.count, (r + 1) * side.count)) : null;
    const groups: ResidualGroup[] = [];
    const blockResiduals: Float64Array[] = [];
    const diffusion: Float64Array[] = [];
    let sumSq = 0;
    const row = new Float64Array(this.size);
    const speciesChannel = (b: number) => (side.chain.blocks[b].species === 'A' ? 0 : 1);
    side.chain.blocks.forEach((block, b) => {
      const cb = side.contour.blocks[b];
      const p = side.pieceOfBlock[b];
      const piece = P[p];
      const D = block.diffusivity * this.lengthFactor;
      const rows = (cb.steps + 1) * nx;
      const sideCols = side.upTo[p];
      const fieldCols = field?.dw ? this.fieldCount : 0;
      // The rows' own columns: this block's piece. The earlier pieces enter only through their
      // junction values' ∂x and ∂xx channels at each x_j, and the field network (when joint)
      // only through w_c(x_j) of the block's species (the residual's ∂/∂w is 1), so their
      // columns are a factored block C·E (numerics/grouped-normal-equations.ts): E holds the
      // 2·nx·p channel gradients, then the nx field gradients ∂w_c(x_j)/∂θ. That cuts the
      // normal-matrix cost of a later block about threefold (measured, 2×16 pieces on 32 × 33
      // points), and of every block of the joint system by the field's columns.
      const pieceLo = P[p].mlp.offset - side.first;
      const ownCols = sideCols - pieceLo;
      const k = ownCols;
      const J = jacobian && withMde ? new Float64Array(rows * k) : null;
      const tJunction = 2 * nx * p;
      const t = tJunction + (fieldCols > 0 ? nx : 0);
      // Factored columns ascending: the field network's and the earlier pieces', in parameter order.
      const fieldFirstInE = fieldCols > 0 && this.fieldFirst < side.first;
      const kf = pieceLo + fieldCols;
      const sideAt = fieldFirstInE ? fieldCols : 0;
      const fieldAt = fieldFirstInE ? 0 : pieceLo;
      const factored =
        J && t > 0
          ? {
              columns: Int32Array.from({ length: kf }, (_, c) => (c >= sideAt && c < sideAt + pieceLo ? side.first + c - sideAt : this.fieldFirst + c - fieldAt)),
              t,
              C: new Float64Array(rows * t),
              E: new Float64Array(t * kf),
            }
          : null;
      if (factored) {
        for (let q = 0; q < p; q++) {
          const at = sideAt + P[q].mlp.offset - side.first;
          for (let j = 0; j < nx; j++) {
            for (let ch = 0; ch < 2; ch++) factored.E.set(endGrad[q][j][1 + ch], ((q * nx + j) * 2 + ch) * kf + at);
          }
        }
        if (fieldCols > 0) for (let j = 0; j < nx; j++) factored.E.set(field!.dw![speciesChannel(b)][j], (tJunction + j) * kf + fieldAt);
      }
      const r = new Float64Array(withMde ? rows : 0);
      blockResiduals.push(r);
      const dRows = jacobian && withMde && this.keepDiffusionRows ? new Float64Array(rows) : null;
      if (dRows) diffusion.push(dRows);
      for (let i = 0; i <= cb.steps; i++) {
        const node = cb.offset + i;
        const s = side.contour.s[node];
        const o = s - piece.start;
        for (let j = 0; j < nx; j++) {
          const y = piece.mlp.forward(theta, this.pieceInput(j, o / piece.length, piece.length, buf), 'full');
          let Uv = 0;
          let Ux = 0;
          let Uxx = 0;
          for (let q = 0; q < p; q++) {
            Uv += P[q].length * ends[q].v[j];
            Ux += P[q].length * ends[q].x[j];
            Uxx += P[q].length * ends[q].xx[j];
          }
          const uv = Uv + o * y[0];
          const ux = Ux + o * y[1];
          const uxx = Uxx + o * y[2];
          const us = y[0] + o * y[3];
          u[node][j] = uv;
          const w = field ? field.w[speciesChannel(b)][j] : side.prescribed![b][j];
          const res = us - D * (uxx + ux * ux) + w;
          if (dRows) dRows[i * nx + j] = mdeScale * D * (uxx + ux * ux);
          const rIndex = i * nx + j;
          if (withMde) {
            r[rIndex] = mdeScale * res;
            sumSq += res * res;
          }
          if (!jacobian) continue;
          const lo = side.first;
          if (valueRows) {
            // The value row ∂u/∂θ over this side's columns (for φ).
            seed.fill(0);
            seed[0] = o;
            row.fill(0, lo, lo + sideCols);
            piece.mlp.backward(theta, seed, row);
            for (let q = 0; q < p; q++) axpy(row, P[q].mlp.offset, P[q].length, endGrad[q][j][0]);
            valueRows[node * nx + j].set(row.subarray(lo, lo + sideCols));
          }
          if (!J) continue;
          // The residual row: seeds on n_p are (v: 1, x: −2D u_x o, xx: −D o, s: o).
          seed[0] = 1;
          seed[1] = -2 * D * ux * o;
          seed[2] = -D * o;
          seed[3] = o;
          const own = lo + pieceLo;
          row.fill(0, own, lo + sideCols);
          piece.mlp.backward(theta, seed, row);
          const sc = mdeScale;
          if (factored) {
            const cRow = rIndex * t;
            for (let q = 0; q < p; q++) {
              factored.C[cRow + (q * nx + j) * 2] = sc * P[q].length * (-2 * D * ux);
              factored.C[cRow + (q * nx + j) * 2 + 1] = sc * P[q].length * -D;
            }
            if (fieldCols > 0) factored.C[cRow + tJunction + j] = sc;
          }
          const out = J.subarray(rIndex * k, (rIndex + 1) * k);
          for (let c = 0; c < ownCols; c++) out[c] = sc * row[own + c];
        }
      }
      if (J) {
        const columns = Int32Array.from({ length: k }, (_, c) => side.first + pieceLo + c);
        groups.push({ columns, J, r, ...(factored ? { factored } : {}) });
      }
    });
    return { u, valueRows, groups, sumSq, blockResiduals, diffusion };
  }

  private fieldEquations(field: { w: Float64Array[]; dw: Float64Array[][] | null }, logQ: Float64Array[][], valueRows: (Float64Array[] | null)[], jacobian: boolean) {
    const nx = this.nx;
    const chiN = this.chiN;
    const [sq, sd] = this.sides;
    const ns = sq.contour.ns;
    const q = logQ[0].map((r) => r.map(Math.exp));
    const qd = logQ[1].map((r) => r.map(Math.exp));
    let Q = 0;
    for (let j = 0; j < nx; j++) Q += q[ns][j];
    Q /= nx;
    const phi = densitiesFromPropagators(sq.contour, q, qd, Q);
    const species = this.nets.chain.species;
    const two = species.length === 2;
    const only = species[0];
    const scale = 1 / Math.max(1, two ? chiN : 0);
    const inc = new Float64Array(nx);
    const sc = new Float64Array(nx);
    let gauge = 0;
    const [wA, wB] = field.w;
    for (let j = 0; j < nx; j++) {
      if (two) {
        inc[j] = phi.A[j] + phi.B[j] - 1;
        sc[j] = wA[j] - wB[j] - chiN * (phi.B[j] - phi.A[j]) + (this.surfaceField ? 2 * this.surfaceField[j] : 0);
        gauge += 0.5 * (wA[j] + wB[j]);
      } else {
        inc[j] = phi[only][j] - 1;
        gauge += only === 'A' ? wA[j] : wB[j];
      }
    }
    gauge /= nx;
    const mean = (a: Float64Array) => a.reduce((s, v) => s + v * v, 0) / nx;
    const terms = { incompressibility: mean(inc), selfConsistency: two ? mean(sc) * scale * scale : 0, gauge: gauge * gauge * scale * scale };
    const W = this.weights;
    const weightedSum = W.incompressibility * terms.incompressibility + W.selfConsistency * terms.selfConsistency + W.gauge * terms.gauge;
    if (!jacobian) return { terms, weightedSum, group: null, phi, dphi: null };
    const n = this.size;
    const rowsCount = (two ? 2 * nx : nx) + 1;
    const J = new Float64Array(rowsCount * n);
    const r = new Float64Array(rowsCount);
    const sInc = Math.sqrt(W.incompressibility / nx);
    const sSc = Math.sqrt(W.selfConsistency / nx) * scale;
    const sG = Math.sqrt(W.gauge) * scale;
    // dφ_K(x_j) over all columns, for K on the chain.
    const dphi: Record<'A' | 'B', Float64Array[]> = { A: [], B: [] };
    const dQ = new Float64Array(n);
    for (let j = 0; j < nx; j++) axpy(dQ, sq.first, q[ns][j] / nx, valueRows[0]![ns * nx + j]);
    const tmp = new Float64Array(n);
    for (const K of species) {
      const c = sq.contour.weights[K];
      for (let j = 0; j < nx; j++) {
        tmp.fill(0);
        for (let i = 0; i <= ns; i++) {
          if (c[i] === 0) continue;
          const coef = (c[i] * q[i][j] * qd[ns - i][j]) / Q;
          axpy(tmp, sq.first, coef, valueRows[0]![i * nx + j]);
          axpy(tmp, sd.first, coef, valueRows[1]![(ns - i) * nx + j]);
        }
        const f = -phi[K][j] / Q;
        for (let a = 0; a < n; a++) tmp[a] += f * dQ[a];
        dphi[K].push(Float64Array.from(tmp));
      }
    }
    const fieldRow = (out: Float64Array, c: number, j: number, factor: number) => axpy(out, this.fieldFirst, factor, field.dw![c][j]);
    for (let j = 0; j < nx; j++) {
      const out = J.subarray(j * n, (j + 1) * n);
      r[j] = sInc * inc[j];
      if (two) for (let a = 0; a < n; a++) out[a] = sInc * (dphi.A[j][a] + dphi.B[j][a]);
      else for (let a = 0; a < n; a++) out[a] = sInc * dphi[only][j][a];
    }
    if (two) {
      for (let j = 0; j < nx; j++) {
        const out = J.subarray((nx + j) * n, (nx + j + 1) * n);
        r[nx + j] = sSc * sc[j];
        for (let a = 0; a < n; a++) out[a] = sSc * chiN * (dphi.A[j][a] - dphi.B[j][a]);
        fieldRow(out, 0, j, sSc);
        fieldRow(out, 1, j, -sSc);
      }
    }
    const last = rowsCount - 1;
    const gOut = J.subarray(last * n, (last + 1) * n);
    r[last] = sG * gauge;
    for (let j = 0; j < nx; j++) {
      if (two) {
        fieldRow(gOut, 0, j, (0.5 * sG) / nx);
        fieldRow(gOut, 1, j, (0.5 * sG) / nx);
      } else fieldRow(gOut, only === 'A' ? 0 : 1, j, sG / nx);
    }
    const columns = Int32Array.from({ length: n }, (_, i) => i);
    return { terms, weightedSum, group: { columns, J, r }, phi, dphi };
  }
}

/** y[offset + i] += a · x[i]. */
function axpy(y: Float64Array, offset: number, a: number, x: Float64Array): void {
  if (a === 0) return;
  for (let i = 0; i < x.length; i++) y[offset + i] += a * x[i];
}

/** A least-squares problem over `count` columns from `first` whose residuals (and dense Jacobian, m rows) a function gives. */
function denseProblem(first: number, count: number, residuals: (xs: Float64Array, jacobian: boolean) => { r: Float64Array; J: Float64Array | null; m: number }): LeastSquaresProblem & { first: number } {
  const cost = (r: Float64Array) => 0.5 * r.reduce((a, v) => a + v * v, 0);
  return {
    first,
    size: count,
    cost: (xs) => cost(residuals(xs, false).r),
    linearise: (xs) => {
      const { r, J, m } = residuals(xs, true);
      return { kind: 'dense', cost: cost(r), m, J: J!, r };
    },
  };
}

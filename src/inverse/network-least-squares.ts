/**
 * The network inverse problem as one least-squares problem: the parameters are the network
 * parameters θ and χN, the residuals are the SCFT residuals of the networks
 * (network/least-squares/scft-residual-system.ts: the MDE of q and q†, incompressibility,
 * self-consistency, gauge) and, beside them, the data rows
 *
 *   r_i = √(λ/n) · (Σ_j M_ji φ_A(x_j) − φ_i) / σ̂_i,    i = 1 … n data points,
 *
 * with M the cell's interpolation matrix (band-limited interpolant, with the resolution's
 * blur) from the residual grid x_j to the data positions in the model frame, σ̂_i the
 * data's standard deviations normalised to a mean inverse variance of 1 (unit weights
 * without a sigma column), and λ the data weight; with DataRows.split these rows are split
 * along the classical fit's directions, the shape beyond them weighted (DataRows.split). χN enters only the self-consistency rows
 *   r_j = √(w_sc/nx) · (w_A − w_B − χN (φ_B − φ_A))(x_j) / max(1, χN₀),
 * whose scale is held at the starting χN₀ here (the residual system scales by the current
 * χN; the rows are rescaled so the objective does not reward a larger χN for shrinking
 * them), so ∂r_j/∂χN = −√(w_sc/nx) (φ_B − φ_A)(x_j) / max(1, χN₀).
 * The physics residuals vanish on the manifold of network SCFT solutions, which χN
 * parametrises; the data rows pick the point on it, so with a small λ the minimiser
 * approaches the constrained least-squares fit of the data by SCFT (the classical
 * estimator's χ² minimum) with the network as the propagator solver.
 *
 * With a free period the cell length L is one more parameter (DataRows.period): the networks
 * stay fixed as functions of x/L, so the MDE's diffusion term scales by (L₀/L)² and the data
 * rows read a stretched interpolant.
 *
 * Solved by Levenberg–Marquardt (numerics/levenberg-marquardt.ts) on the normal equations
 * assembled per row group (numerics/grouped-normal-equations.ts); the χN column is one
 * more column of the field-equation group.
 *
 * Units: x in Rg, s ∈ [0, 1], w and χN in kT per chain; φ dimensionless.
 */
import { groupedGradient, groupedNormalEquations } from '../numerics/grouped-normal-equations.js';
import type { ResidualGroup } from '../numerics/grouped-normal-equations.js';
import type { LeastSquaresProblem, NormalLinearisation } from '../numerics/levenberg-marquardt.js';
import type { ScftResidualSystem } from '../network/least-squares/scft-residual-system.js';
import type { LossValues } from '../network/losses/terms.js';
import { meanInverseVariance, pointSigmas } from './data-weights.js';

export interface DataRows {
  /** Interpolation matrix from the residual grid to the data points, row-major [j · n + i]. */
  matrix: Float64Array;
  /**
   * When given, the cell length L is a parameter too (a free period): `matrixAt(L)` is the
   * matrix with the cell stretched from the residual system's length `length` (L₀) to L, the
   * networks unchanged in x/L (`matrix` is the one at L₀).
   */
  period?: { length: number; matrixAt: (L: number) => Float64Array };
  /** Measured φ_A at the data points. */
  phi: Float64Array;
  /** Per-point standard deviations, or undefined for unit weights. */
  sigma?: Float64Array;
  /**
   * When given, the data rows split along the classical fit's directions (∂φ/∂β at its
   * estimate, inverse/fit-directions.ts): with e the weighted point rows and P the orthogonal
   * projection on the directions' span (in the rows' own weighting), the data cost is
   * ½|P e|² + ½ shapeWeight |(I − P) e|² (the point rows themselves at shapeWeight 1).
   */
  split?: { directions: Float64Array[]; shapeWeight: number };
}

export interface InverseEvaluation {
  cost: number;
  /** The unweighted SCFT loss terms (self-consistency at the fixed scale). */
  terms: LossValues;
  /** Mean squared data misfit Σ (fit − φ)² / n (φ units, unweighted). */
  misfit: number;
  /** The network's φ_A at the data points. */
  fit: Float64Array;
}

export class NetworkInverseProblem implements LeastSquaresProblem {
  readonly size: number;
  private readonly n: number;
  private readonly rowScale: Float64Array;
  private readonly scaleFixed: number;
  /** When set, χN (and a free period) are held: their columns are zero, so the step leaves them where they are. */
  holdChiN = false;
  /** Column of χN: the last (with a free period, L's is the one before it). */
  private readonly chiNColumn: number;
  private lastMatrix: { L: number; M: Float64Array } | null = null;
  /** Orthonormal basis of the weighted directions (DataRows.split), or null: the point rows as they are. */
  private readonly basis: Float64Array[] | null;

  constructor(
    private readonly sys: ScftResidualSystem,
    private readonly data: DataRows,
    readonly chiNStart: number,
    readonly dataWeight: number,
  ) {
    this.n = data.phi.length;
    this.size = sys.size + (data.period ? 2 : 1);
    this.chiNColumn = this.size - 1;
    const sig = pointSigmas(data.sigma, this.n);
    const meanInvVar = meanInverseVariance(sig);
    this.rowScale = Float64Array.from(sig, (v) => Math.sqrt(dataWeight / this.n) / (v * Math.sqrt(meanInvVar)));
    this.scaleFixed = 1 / Math.max(1, chiNStart);
    // A free period needs the MDE rows' diffusion terms for its column (linearise).
    if (data.period) sys.keepDiffusionRows = true;
    this.basis = data.split ? orthonormalBasis(data.split.directions.map((a) => Float64Array.from(a, (v, i) => v * this.rowScale[i]))) : null;
    if (data.matrix.length !== sys.nx * this.n) throw new RangeError(`data matrix has ${data.matrix.length} entries, expected ${sys.nx}·${this.n}`);
  }

  /** The interpolation matrix of the data rows at cell length L (the last one asked is kept). */
  private matrixFor(L: number): Float64Array {
    const per = this.data.period;
    if (!per || L === per.length) return this.data.matrix;
    if (this.lastMatrix?.L !== L) this.lastMatrix = { L, M: per.matrixAt(L) };
    return this.lastMatrix.M;
  }

  /** θ, χN and the cell length (L₀ when the period is not a parameter) of a parameter vector. */
  split(x: Float64Array): { theta: Float64Array; chiN: number; length: number } {
    return { theta: x.subarray(0, this.sys.size), chiN: x[this.chiNColumn], length: this.data.period ? x[this.sys.size] : Number.NaN };
  }

  /** The parameter vector of θ, χN and (with a free period) the cell length L. */
  join(theta: Float64Array, chiN: number, length?: number): Float64Array {
    const x = new Float64Array(this.size);
    x.set(theta);
    if (this.data.period) x[this.sys.size] = length ?? this.data.period.length;
    x[this.chiNColumn] = chiN;
    return x;
  }

  /** Puts χN and the cell length of x into the residual system (before it is used on its own). */
  applyState(x: Float64Array): void {
    const { chiN, length } = this.split(x);
    this.setState(chiN, length);
  }

  /** Puts χN and the cell length into the residual system; the data matrix at that length. */
  private setState(chiN: number, length: number): Float64Array {
    this.sys.chiN = chiN;
    const per = this.data.period;
    this.sys.lengthFactor = per ? (per.length / length) ** 2 : 1;
    return this.matrixFor(length);
  }

  /** Factor that takes the residual system's self-consistency/gauge rows to the fixed scale. */
  private rescale(chiN: number): number {
    return Math.max(1, chiN) * this.scaleFixed;
  }

  evaluate(x: Float64Array): InverseEvaluation {
    const { theta, chiN, length } = this.split(x);
    const M = this.setState(chiN, length);
    const e = this.sys.evaluate(theta, false);
    return this.withData(e.cost, e.terms, this.fitAt(e.density!.phi.A, M), chiN);
  }

  /** The evaluation from the residual system's cost and terms and the network's φ_A at the data points (`fit`). */
  private withData(sysCost: number, terms: LossValues, fit: Float64Array, chiN: number): InverseEvaluation {
    const W = this.sys.weights;
    const rho2 = this.rescale(chiN) ** 2;
    const fixedTerms = { ...terms, selfConsistency: terms.selfConsistency * rho2, gauge: terms.gauge * rho2 };
    let cost = sysCost + 0.5 * (W.selfConsistency * terms.selfConsistency + W.gauge * terms.gauge) * (rho2 - 1);
    let misfit = 0;
    const e = new Float64Array(this.n);
    for (let i = 0; i < this.n; i++) {
      const d = fit[i] - this.data.phi[i];
      misfit += d * d;
      e[i] = this.rowScale[i] * d;
    }
    for (const v of this.splitRows(e, 1).r) cost += 0.5 * v * v;
    return { cost, terms: fixedTerms, misfit: misfit / this.n, fit };
  }

  private fitAt(phiA: Float64Array, M: Float64Array): Float64Array {
    const n = this.n;
    const fit = new Float64Array(n);
    for (let j = 0; j < phiA.length; j++) {
      const p = phiA[j];
      const o = j * n;
      for (let i = 0; i < n; i++) fit[i] += p * M[o + i];
    }
    return fit;
  }

  /**
   * The data rows as the problem holds them, from the weighted point rows e (n) and their
   * Jacobian J (n × cols, row-major): e and J themselves, or with DataRows.split the m rows
   * Qᵀe and the n rows √w (e − Q Qᵀe) (w the shape weight; none when w = 0), and their Jacobians.
   */
  private splitRows(e: Float64Array, cols: number, J?: Float64Array): { r: Float64Array; J?: Float64Array } {
    const Q = this.basis;
    if (!Q) return { r: e, J };
    const n = this.n;
    const m = Q.length;
    const root = Math.sqrt(this.data.split!.shapeWeight);
    const rows = root > 0 ? m + n : m;
    const r = new Float64Array(rows);
    const Jout = J ? new Float64Array(rows * cols) : undefined;
    Q.forEach((q, k) => {
      let v = 0;
      for (let i = 0; i < n; i++) v += q[i] * e[i];
      r[k] = v;
      if (J) {
        const row = Jout!.subarray(k * cols, (k + 1) * cols);
        for (let i = 0; i < n; i++) {
          const c = q[i];
          if (c === 0) continue;
          const src = J.subarray(i * cols, (i + 1) * cols);
          for (let a = 0; a < cols; a++) row[a] += c * src[a];
        }
      }
    });
    if (root === 0) return { r, J: Jout };
    // √w (I − Q Qᵀ) on e and on J: the rows minus their parts in the span.
    for (let i = 0; i < n; i++) {
      let v = e[i];
      for (let k = 0; k < m; k++) v -= Q[k][i] * r[k];
      r[m + i] = root * v;
      if (J) {
        const dst = Jout!.subarray((m + i) * cols, (m + i + 1) * cols);
        const src = J.subarray(i * cols, (i + 1) * cols);
        for (let a = 0; a < cols; a++) {
          let w = src[a];
          for (let k = 0; k < m; k++) w -= Q[k][i] * Jout![k * cols + a];
          dst[a] = root * w;
        }
      }
    }
    return { r, J: Jout };
  }

  cost(x: Float64Array): number {
    return this.evaluate(x).cost;
  }

  linearise(x: Float64Array): NormalLinearisation {
    const { theta, chiN, length } = this.split(x);
    const sys = this.sys;
    const M = this.setState(chiN, length);
    const e = sys.evaluate(theta, true);
    const density = e.density;
    if (!density?.dphi) throw new Error('network inverse: the networks need a field network and two species');
    const groups = e.groups!;
    const nx = sys.nx;
    const p = sys.size;
    const cols = this.size;
    // The field-equation group (nx incompressibility rows, nx self-consistency rows, the gauge):
    // the last group, over every column; rebuilt with the χN column and the fixed scale.
    const fe = groups[groups.length - 1];
    if (fe.columns.length !== p || fe.r.length !== 2 * nx + 1) throw new Error('network inverse: unexpected residual groups (a two-species chain with a field network is needed)');
    const rho = this.rescale(chiN);
    const rows = fe.r.length;
    const J = new Float64Array(rows * cols);
    const r = new Float64Array(rows);
    const scScale = Math.sqrt(sys.weights.selfConsistency / nx) * this.scaleFixed;
    for (let i = 0; i < rows; i++) {
      const f = i < nx ? 1 : rho;
      r[i] = f * fe.r[i];
      const src = fe.J.subarray(i * p, (i + 1) * p);
      const dst = J.subarray(i * cols, i * cols + p);
      for (let a = 0; a < p; a++) dst[a] = f * src[a];
      if (i >= nx && i < 2 * nx && !this.holdChiN) {
        const j = i - nx;
        J[i * cols + this.chiNColumn] = -scScale * (density.phi.B[j] - density.phi.A[j]);
      }
    }
    const all = Int32Array.from({ length: cols }, (_, i) => i);
    // Data rows: r_i = s_i (Σ_j M_ji φ_A(x_j) − φ_i); ∂/∂θ through dφ_A(x_j)/dθ; no χN column.
    const n = this.n;
    const fit = this.fitAt(density.phi.A, M);
    const Jd = new Float64Array(n * cols);
    const rd = new Float64Array(n);
    for (let i = 0; i < n; i++) rd[i] = this.rowScale[i] * (fit[i] - this.data.phi[i]);
    for (let j = 0; j < nx; j++) {
      const d = density.dphi.A[j];
      const o = j * n;
      for (let i = 0; i < n; i++) {
        const c = this.rowScale[i] * M[o + i];
        if (c === 0) continue;
        const row = Jd.subarray(i * cols, i * cols + p);
        for (let a = 0; a < p; a++) row[a] += c * d[a];
      }
    }
    const mde = groups.slice(0, -1);
    const per = this.data.period;
    const lengthFree = per !== undefined && !this.holdChiN;
    if (lengthFree) {
      // The length column of the data rows: ∂/∂L of the stretched interpolant, by central
      // differences (a trigonometric polynomial: with h = 1e-6 L the error is round-off, about
      // 1e-10 relative).
      const h = 1e-6 * length;
      const up = this.fitAt(density.phi.A, per.matrixAt(length + h));
      const down = this.fitAt(density.phi.A, per.matrixAt(length - h));
      for (let i = 0; i < n; i++) Jd[i * cols + p] = (this.rowScale[i] * (up[i] - down[i])) / (2 * h);
    }
    const held = this.splitRows(rd, cols, Jd);
    const all2: ResidualGroup[] = [...mde, { columns: all, J, r }, { columns: all, J: held.J!, r: held.r }];
    const { A, g } = groupedNormalEquations(cols, all2);
    if (lengthFree) {
      // The length column of the MDE rows, added to the normal equations as its products (the
      // groups keep their columns, so their kernels stay as they are): with u fixed in x/L,
      // r = u_s − D (L₀/L)² (u_xx + u_x²) + w, so ∂r/∂L = (2/L) · D (L₀/L)² (u_xx + u_x²), the
      // diffusion term as the row holds it. Row L of A gets Jᵀd over the θ columns and d·d; g_L d·r.
      const d = e.diffusionRows!.map((rows) => Float64Array.from(rows, (v) => (2 / length) * v));
      const cross = groupedGradient(cols, mde, d);
      for (let c = 0; c < p; c++) A[p * cols + c] += cross[c];
      mde.forEach((grp, k) => {
        for (let i = 0; i < grp.r.length; i++) {
          A[p * cols + p] += d[k][i] * d[k][i];
          g[p] += d[k][i] * grp.r[i];
        }
      });
    }
    const cost = this.withData(e.cost, e.terms, fit, chiN).cost;
    return { kind: 'normal', cost, A, g };
  }
}

/** Modified Gram–Schmidt (Golub & Van Loan, "Matrix Computations", 4th ed., §5.2.8): an orthonormal basis of the vectors' span, dependent ones dropped. */
function orthonormalBasis(vectors: Float64Array[]): Float64Array[] {
  const basis: Float64Array[] = [];
  for (const a of vectors) {
    const v = Float64Array.from(a);
    const size = Math.hypot(...v);
    for (const q of basis) {
      let d = 0;
      for (let i = 0; i < v.length; i++) d += q[i] * v[i];
      for (let i = 0; i < v.length; i++) v[i] -= d * q[i];
    }
    const left = Math.hypot(...v);
    if (!(left > 1e-10 * size)) continue;
    basis.push(v.map((x) => x / left));
  }
  return basis;
}

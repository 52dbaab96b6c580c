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
 * without a sigma column), and λ the data weight. χN enters only the self-consistency rows
 *   r_j = √(w_sc/nx) · (w_A − w_B − χN (φ_B − φ_A))(x_j) / max(1, χN₀),
 * whose scale is held at the starting χN₀ here (the residual system scales by the current
 * χN; the rows are rescaled so the objective does not reward a larger χN for shrinking
 * them), so ∂r_j/∂χN = −√(w_sc/nx) (φ_B − φ_A)(x_j) / max(1, χN₀).
 * The physics residuals vanish on the manifold of network SCFT solutions, which χN
 * parametrises; the data rows pick the point on it, so with a small λ the minimiser
 * approaches the constrained least-squares fit of the data by SCFT (the classical
 * estimator's χ² minimum) with the network as the propagator solver.
 *
 * Solved by Levenberg–Marquardt (numerics/levenberg-marquardt.ts) on the normal equations
 * assembled per row group (numerics/grouped-normal-equations.ts); the χN column is one
 * more column of the field-equation group.
 *
 * Units: x in Rg, s ∈ [0, 1], w and χN in kT per chain; φ dimensionless.
 */
import { groupedNormalEquations } from '../numerics/grouped-normal-equations.js';
import type { ResidualGroup } from '../numerics/grouped-normal-equations.js';
import type { LeastSquaresProblem, NormalLinearisation } from '../numerics/levenberg-marquardt.js';
import type { ScftResidualSystem } from '../network/least-squares/scft-residual-system.js';
import type { LossValues } from '../network/losses/terms.js';

export interface DataRows {
  /** Interpolation matrix from the residual grid to the data points, row-major [j · n + i]. */
  matrix: Float64Array;
  /** Measured φ_A at the data points. */
  phi: Float64Array;
  /** Per-point standard deviations, or undefined for unit weights. */
  sigma?: Float64Array;
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
  /** When set, χN is held: its column is zero, so the step leaves it where it is. */
  holdChiN = false;

  constructor(
    private readonly sys: ScftResidualSystem,
    private readonly data: DataRows,
    readonly chiNStart: number,
    readonly dataWeight: number,
  ) {
    this.n = data.phi.length;
    this.size = sys.size + 1;
    const sig = data.sigma ?? new Float64Array(this.n).fill(1);
    let meanInvVar = 0;
    for (const v of sig) meanInvVar += 1 / (v * v);
    meanInvVar /= this.n;
    this.rowScale = Float64Array.from(sig, (v) => Math.sqrt(dataWeight / this.n) / (v * Math.sqrt(meanInvVar)));
    this.scaleFixed = 1 / Math.max(1, chiNStart);
    if (data.matrix.length !== sys.nx * this.n) throw new RangeError(`data matrix has ${data.matrix.length} entries, expected ${sys.nx}·${this.n}`);
  }

  /** The interpolation matrix of the data rows. */
  get matrix(): Float64Array {
    return this.data.matrix;
  }

  /** θ and χN of a parameter vector. */
  split(x: Float64Array): { theta: Float64Array; chiN: number } {
    return { theta: x.subarray(0, this.sys.size), chiN: x[this.sys.size] };
  }

  join(theta: Float64Array, chiN: number): Float64Array {
    const x = new Float64Array(this.size);
    x.set(theta);
    x[this.sys.size] = chiN;
    return x;
  }

  /** Factor that takes the residual system's self-consistency/gauge rows to the fixed scale. */
  private rescale(chiN: number): number {
    return Math.max(1, chiN) * this.scaleFixed;
  }

  evaluate(x: Float64Array): InverseEvaluation {
    const { theta, chiN } = this.split(x);
    this.sys.chiN = chiN;
    const e = this.sys.evaluate(theta, false);
    return this.withData(e.cost, e.terms, e.density!.phi.A, chiN);
  }

  private withData(sysCost: number, terms: LossValues, phiA: Float64Array, chiN: number): InverseEvaluation {
    const W = this.sys.weights;
    const rho2 = this.rescale(chiN) ** 2;
    const fixedTerms = { ...terms, selfConsistency: terms.selfConsistency * rho2, gauge: terms.gauge * rho2 };
    let cost = sysCost + 0.5 * (W.selfConsistency * terms.selfConsistency + W.gauge * terms.gauge) * (rho2 - 1);
    const fit = this.fitAt(phiA);
    let misfit = 0;
    for (let i = 0; i < this.n; i++) {
      const d = fit[i] - this.data.phi[i];
      misfit += d * d;
      cost += 0.5 * (this.rowScale[i] * d) ** 2;
    }
    return { cost, terms: fixedTerms, misfit: misfit / this.n, fit };
  }

  private fitAt(phiA: Float64Array): Float64Array {
    const n = this.n;
    const M = this.data.matrix;
    const fit = new Float64Array(n);
    for (let j = 0; j < phiA.length; j++) {
      const p = phiA[j];
      const o = j * n;
      for (let i = 0; i < n; i++) fit[i] += p * M[o + i];
    }
    return fit;
  }

  cost(x: Float64Array): number {
    return this.evaluate(x).cost;
  }

  linearise(x: Float64Array): NormalLinearisation {
    const { theta, chiN } = this.split(x);
    const sys = this.sys;
    sys.chiN = chiN;
    const e = sys.evaluate(theta, true);
    const density = e.density;
    if (!density?.dphi) throw new Error('network inverse: the networks need a field network and two species');
    const groups = e.groups!;
    const nx = sys.nx;
    const p = sys.size;
    const cols = p + 1;
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
        J[i * cols + p] = -scScale * (density.phi.B[j] - density.phi.A[j]);
      }
    }
    const all = Int32Array.from({ length: cols }, (_, i) => i);
    // Data rows: r_i = s_i (Σ_j M_ji φ_A(x_j) − φ_i); ∂/∂θ through dφ_A(x_j)/dθ; no χN column.
    const n = this.n;
    const M = this.data.matrix;
    const fit = this.fitAt(density.phi.A);
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
    const all2: ResidualGroup[] = [...groups.slice(0, -1), { columns: all, J, r }, { columns: all, J: Jd, r: rd }];
    const { A, g } = groupedNormalEquations(cols, all2);
    const cost = this.withData(e.cost, e.terms, density.phi.A, chiN).cost;
    return { kind: 'normal', cost, A, g };
  }
}

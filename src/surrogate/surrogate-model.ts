/**
 * A surrogate as a whole: the parameter box, the period model L(θ) and the field network,
 * and the surrogate's answer at a parameter point θ as an ScftSolution:
 *   fields  w_K(x_j; θ) from the network on x_j = j·L(θ)/nx (one period per cell), the
 *           pressure gauge then fixed exactly (mean (w_A + w_B)/2 = 0, as the reference);
 *   φ, Q    one float64 pseudo-spectral propagator solve in those fields, no iteration
 *           (spectral/scft-solver.ts solveInFields; docs/physics.md "Numerical methods");
 *   F       physics/scft-equations.ts, from that Q, w and φ.
 * The network learns the hard part (the self-consistent fields as a function of θ); the
 * single-chain problem in given fields is linear and costs about a millisecond exactly.
 * Units: x and L in Rg, t = x/L, fields and F in kT per chain.
 */
import type { SurrogateConfig } from '../io/schemas/surrogate-config.js';
import type { SpeciesArrays } from '../physics/fields.js';
import type { ScftSolution } from '../physics/result.js';
import { PeriodicCell } from '../physics/cell/periodic-cell.js';
import { fixGauge } from '../physics/scft-equations.js';
import { solveInFields } from '../spectral/scft-solver.js';
import type { Tf } from '../autodiff/tf.js';
import { ParameterSpace } from './parameter-space.js';
import type { ParameterPoint } from './parameter-space.js';
import { periodAt } from './period-model.js';
import type { PeriodModel } from './period-model.js';
import { SurrogateFieldNet } from './surrogate-networks.js';
import type { ParameterGroup } from './surrogate-networks.js';

/** Fractional grid t_j = j/n. */
export function fractionalGrid(n: number): Float64Array {
  return Float64Array.from({ length: n }, (_, j) => j / n);
}

export class SurrogateModel {
  readonly space: ParameterSpace;
  readonly field: SurrogateFieldNet;

  constructor(
    readonly tf: Tf,
    readonly config: SurrogateConfig,
    readonly periodModel: PeriodModel,
  ) {
    this.space = new ParameterSpace(config);
    this.field = new SurrogateFieldNet(tf, config.networks.field, this.space.dimension);
  }

  get parameters() {
    return this.field.parameters;
  }

  period(p: ParameterPoint): number {
    return periodAt(this.periodModel, this.space.values(p));
  }

  group(p: ParameterPoint, t: ArrayLike<number>): ParameterGroup {
    return { chiN: p.chiN, period: this.period(p), hat: this.space.normalised(p), t };
  }

  /** Fields w_A, w_B (kT) at t_j = j/nx for each point, from one batched forward pass. */
  fields(points: ParameterPoint[], nx: number): SpeciesArrays[] {
    const tf = this.tf;
    const t = fractionalGrid(nx);
    const groups = points.map((p) => this.group(p, t));
    const feats = this.field.features(groups);
    const scale = this.field.scale(groups);
    const out = tf.tidy(() => tf.mul(this.field.forward(feats), scale));
    const flat = out.dataSync() as Float32Array;
    out.dispose();
    feats.dispose();
    scale.dispose();
    return points.map((_, k) => {
      const w = { A: new Float64Array(nx), B: new Float64Array(nx) };
      for (let j = 0; j < nx; j++) {
        w.A[j] = flat[2 * (k * nx + j)];
        w.B[j] = flat[2 * (k * nx + j) + 1];
      }
      return w;
    });
  }

  /** The surrogate's solution at each point, on nx points (a power of two) and ns contour steps. */
  solutions(points: ParameterPoint[], nx = this.config.cell.nx, ns = this.config.cell.ns): ScftSolution[] {
    const t0 = performance.now();
    const fields = this.fields(points, nx);
    const shared = (performance.now() - t0) / 1000 / Math.max(1, points.length);
    return points.map((p, k) => {
      // The pressure gauge is a convention (mean of (w_A + w_B)/2 = 0, as the reference): fix it exactly.
      fixGauge(this.space.chain(p), fields[k]);
      const sol = solveInFields({ system: this.space.system(p), cell: new PeriodicCell(this.period(p), nx, 1), contour: ns, options: this.config.solver, fields: fields[k] });
      return {
        ...sol,
        solver: 'surrogate' as const,
        seconds: sol.seconds + shared,
        notes: [`surrogate at ${this.space.describe(p)}: fields from the network, period L(θ) = ${sol.period.toFixed(6)} Rg from the anchors; ${sol.notes.join('; ')}; residual = max |w_out − w| of these fields (kT)`],
      };
    });
  }

  dispose(): void {
    this.field.dispose();
  }
}

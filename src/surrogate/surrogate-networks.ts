/**
 * The field network of a parametric surrogate: the single-point field network (field-net.ts)
 * with the parameters as extra inputs and x scaled by the period.
 *
 * Inputs per point (x in Rg, θ the parameter point):
 *   t = x / L(θ), L(θ) the period from the anchors (period-model.ts), seen through the
 *   exactly periodic features sin, cos(2πm t), m = 1..M (Dong & Ni, J. Comput. Phys. 435,
 *   110242, 2021; features.ts), so the fields have period L(θ) in x at every θ;
 *   θ̂ = (θ − mid)/half-range per varying parameter (parameter-space.ts).
 * Output: w_K(x; θ) = χN · n_K(t, θ̂) (kT per chain), K = A, B: n is O(1) over the χN range
 * because the fields scale with χN (w_A − w_B = χN(φ_B − φ_A) at self-consistency).
 * Only values are needed (the propagators in these fields are solved spectrally), so the
 * input jets carry no derivative channels.
 */
import type * as TfModule from '@tensorflow/tfjs';
import type { SurrogateConfig } from '../io/schemas/surrogate-config.js';
import type { Tf } from '../autodiff/tf.js';
import { f32, periodicFeatureArrays, periodicWidth } from '../network/features.js';
import { Jet } from '../autodiff/jet.js';
import { Mlp } from '../autodiff/mlp.js';
import { ParameterSet } from '../autodiff/parameters.js';

/** Points t = x/L ∈ [0, 1) of one parameter point θ. */
export interface ParameterGroup {
  chiN: number;
  /** L(θ) in Rg. */
  period: number;
  /** θ̂, one entry per varying parameter. */
  hat: number[];
  t: ArrayLike<number>;
}

export class SurrogateFieldNet {
  readonly mlp: Mlp;
  readonly parameters: ParameterSet;

  constructor(
    readonly tf: Tf,
    readonly config: SurrogateConfig['networks']['field'],
    readonly parameterCount: number,
  ) {
    this.mlp = new Mlp(tf, { inputs: periodicWidth(config.fourierModes) + parameterCount, hidden: config.hidden, outputs: 2, activation: config.activation, seed: config.seed, name: 'field' });
    this.parameters = new ParameterSet(tf, this.mlp.entries);
  }

  /** Width of one input row: the periodic features and θ̂. */
  get inputWidth(): number {
    return periodicWidth(this.config.fourierModes) + this.parameterCount;
  }

  /** Input rows [sin, cos(2πm t) … | θ̂] of the groups' points as a value-only jet, kept out of tf.tidy: dispose when done. */
  features(groups: ParameterGroup[]): Jet {
    const v = this.featureRows(groups);
    return Jet.constant(this.tf, this.tf.tensor2d(f32(v), [v.length / this.inputWidth, this.inputWidth])).keep();
  }

  /** The same input rows in float64, row-major (n · inputWidth): the float64 fit (surrogate-lm-fit.ts) reads them. */
  featureRows(groups: ParameterGroup[]): Float64Array {
    const pw = periodicWidth(this.config.fourierModes);
    const width = pw + this.parameterCount;
    const n = groups.reduce((k, g) => k + g.t.length, 0);
    const v = new Float64Array(n * width);
    let row = 0;
    for (const g of groups) {
      // features.ts works in x: x = t·L with period L gives sin, cos(2πm t).
      const a = periodicFeatureArrays(Array.from(g.t, (t) => t * g.period), g.period, this.config.fourierModes);
      for (let i = 0; i < g.t.length; i++, row++) {
        v.set(a.v.subarray(i * pw, (i + 1) * pw), row * width);
        v.set(g.hat, row * width + pw);
      }
    }
    return v;
  }

  /** χN per row of `features` ([n, 1], kept): the output scale w = χN · n. */
  scale(groups: ParameterGroup[]): TfModule.Tensor {
    const n = groups.reduce((k, g) => k + g.t.length, 0);
    return this.tf.keep(this.tf.tensor2d(Float32Array.from(groups.flatMap((g) => Array.from(g.t, () => g.chiN))), [n, 1]));
  }

  /** Normalised fields n = w/χN, [n, 2] (columns A, B). */
  forward(features: Jet): TfModule.Tensor {
    return this.mlp.forward(features).v;
  }

  dispose(): void {
    this.parameters.dispose();
  }
}

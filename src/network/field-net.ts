/**
 * Field network w(x): one output channel per species (e.g. w_A, w_B in kT), input the
 * features of the cell (src/network/features.ts): exactly periodic in a periodic cell, even
 * about both walls in a film, so every output obeys the cell's boundary condition with all its
 * derivatives. Parameter names `${name}/layer${ℓ}/kernel|bias`.
 *
 * A film's surface field h(x) (physics/cell/film-cell.ts) enters the fields as it does in the
 * reference: at a solution w_A = χN φ_B − h + ξ and w_B = χN φ_A + h + ξ
 * (physics/scft-equations.ts), so the network gives the smooth part and the known h is added
 * exactly, w_A = n_A(x) − h(x), w_B = n_B(x) + h(x). The wall's field is a half-Gaussian a
 * fraction of an Rg wide; the rest varies on the scale of the lamellae, which a few features
 * carry. With a surface field the network is evaluated for its values only (the training
 * never needs the field's derivatives).
 */
import type * as TfModule from '@tensorflow/tfjs';
import type { FieldNetworkConfig } from '../io/schemas/network-schema.js';
import type { Tf } from '../autodiff/tf.js';
import { cellFeatures, f32, featureWidth, periodicFeatureCell } from './features.js';
import type { FeatureCell } from './features.js';
import { Jet } from '../autodiff/jet.js';
import { Mlp } from '../autodiff/mlp.js';
import { ParameterSet } from '../autodiff/parameters.js';

export interface FieldNetOptions {
  /** Periodic cell length L in Rg (when no `cell` is given). */
  period?: number;
  /** The cell whose features (and surface field) the network uses. */
  cell?: FeatureCell;
  /** Output channels (species). */
  outputs: number;
  /** Prefix of the parameter names. */
  name?: string;
}

/** The features of fixed points with the surface-field offset [n, outputs] (−h, +h) that the outputs get, if any. */
export class FieldFeatures extends Jet {
  constructor(
    tf: Tf,
    features: Jet,
    readonly offset: TfModule.Tensor | null,
  ) {
    super(tf, features.v, features.dx, features.dxx, null);
  }

  override keep(): this {
    super.keep();
    if (this.offset) this.tf.keep(this.offset);
    return this;
  }

  override dispose(): void {
    super.dispose();
    this.offset?.dispose();
  }
}

export class FieldNet {
  readonly mlp: Mlp;
  readonly parameters: ParameterSet;
  readonly cell: FeatureCell;

  constructor(
    readonly tf: Tf,
    readonly config: FieldNetworkConfig,
    readonly options: FieldNetOptions,
  ) {
    if (options.cell) this.cell = options.cell;
    else {
      if (!(options.period! > 0)) throw new RangeError(`period must be > 0, got ${options.period}`);
      this.cell = periodicFeatureCell(options.period!);
    }
    this.mlp = new Mlp(tf, {
      inputs: featureWidth(this.cell.features, config.fourierModes),
      hidden: config.hidden,
      outputs: options.outputs,
      activation: config.activation,
      seed: config.seed,
      name: options.name ?? 'field',
    });
    this.parameters = new ParameterSet(tf, this.mlp.entries);
  }

  /**
   * Constant feature jet of fixed points x (kept out of tf.tidy; dispose when done).
   * With derivatives = false the forward pass computes values only (always so with a surface field).
   */
  features(x: ArrayLike<number>, derivatives = true): FieldFeatures {
    const h = this.cell.surfaceFieldAt(x);
    const plain = cellFeatures(this.tf, x, this.cell.features, this.config.fourierModes, derivatives && !h);
    let offset: TfModule.Tensor | null = null;
    if (h) {
      const k = this.options.outputs;
      const o = new Float64Array(x.length * k);
      // Channel 0 is A (lowered by h), channel 1 is B (raised by h).
      for (let i = 0; i < x.length; i++) {
        o[i * k] = -h[i];
        if (k > 1) o[i * k + 1] = h[i];
      }
      offset = this.tf.tensor2d(f32(o), [x.length, k]);
    }
    return new FieldFeatures(this.tf, plain, offset).keep();
  }

  /** w at the points of `features`: jet [n, outputs] of values (the derivative channels are not formed). */
  forward(features: Jet): Jet {
    const out = this.mlp.forward(features);
    const offset = features instanceof FieldFeatures ? features.offset : null;
    return offset ? new Jet(this.tf, this.tf.add(out.v, offset), out.dx, out.dxx, null) : out;
  }

  /** The surface-field offsets (−h, +h) at points x in float64, or null (for float64 evaluations of the same network). */
  offsetAt(x: ArrayLike<number>): Float64Array[] | null {
    const h = this.cell.surfaceFieldAt(x);
    return h ? [Float64Array.from(h, (v) => -v), Float64Array.from(h)] : null;
  }

  dispose(): void {
    this.parameters.dispose();
  }
}

/**
 * Field network w(x): one output channel per species (e.g. w_A, w_B in kT), input the
 * exactly periodic features of x (src/network/features.ts), so every output is L-periodic
 * with all its derivatives. Parameter names `${name}/layer${ℓ}/kernel|bias`.
 */
import type { FieldNetworkConfig } from '../io/schemas/network-schema.js';
import type { Tf } from '../autodiff/tf.js';
import { periodicFeatures, periodicWidth } from './features.js';
import type { Jet } from '../autodiff/jet.js';
import { Mlp } from '../autodiff/mlp.js';
import { ParameterSet } from '../autodiff/parameters.js';

export interface FieldNetOptions {
  /** Cell length L in Rg. */
  period: number;
  /** Output channels (species). */
  outputs: number;
  /** Prefix of the parameter names. */
  name?: string;
}

export class FieldNet {
  readonly mlp: Mlp;
  readonly parameters: ParameterSet;

  constructor(
    readonly tf: Tf,
    readonly config: FieldNetworkConfig,
    readonly options: FieldNetOptions,
  ) {
    if (!(options.period > 0)) throw new RangeError(`period must be > 0, got ${options.period}`);
    this.mlp = new Mlp(tf, {
      inputs: periodicWidth(config.fourierModes),
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
   * With derivatives = false the forward pass computes values only.
   */
  features(x: ArrayLike<number>, derivatives = true): Jet {
    return periodicFeatures(this.tf, x, this.options.period, this.config.fourierModes, derivatives).keep();
  }

  /** w and its x-derivatives at the points of `features`: jet [n, outputs], ds null. */
  forward(features: Jet): Jet {
    return this.mlp.forward(features);
  }

  dispose(): void {
    this.parameters.dispose();
  }
}

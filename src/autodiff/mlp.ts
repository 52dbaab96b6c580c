/**
 * A fully connected network on jets: hidden layers z ← act(zW + b), then a linear output
 * layer. Kernels Glorot-uniform (Glorot & Bengio, AISTATS 2010, eq. 16: W ~ U(−a, a),
 * a = sqrt(6 / (fan_in + fan_out))), drawn from the seeded xorshift128 generator
 * (src/numerics/random.ts), so equal seeds give equal networks on every backend; biases zero.
 * Layer ℓ has parameters `${name}/layer${ℓ}/kernel` [in, out] and `${name}/layer${ℓ}/bias` [out].
 */
import type * as TfModule from '@tensorflow/tfjs';
import type { Tf } from './tf.js';
import type { Jet } from './jet.js';
import type { ParameterEntry } from './parameters.js';
import { Xorshift128 } from '../numerics/random.js';

/** Glorot-uniform kernel [fanIn, fanOut], row-major. */
export function glorotUniform(rng: Xorshift128, fanIn: number, fanOut: number): Float64Array {
  const a = Math.sqrt(6 / (fanIn + fanOut));
  const w = new Float64Array(fanIn * fanOut);
  for (let i = 0; i < w.length; i++) w[i] = (2 * rng.next() - 1) * a;
  return w;
}

export type Activation = 'tanh' | 'sin';

export interface MlpSpec {
  inputs: number;
  hidden: number[];
  outputs: number;
  activation: Activation;
  seed: number;
  name: string;
}

interface Layer {
  kernel: TfModule.Variable;
  bias: TfModule.Variable;
}

export class Mlp {
  readonly layers: Layer[] = [];
  readonly entries: ParameterEntry[] = [];

  constructor(
    readonly tf: Tf,
    readonly spec: MlpSpec,
  ) {
    const rng = new Xorshift128(spec.seed);
    const widths = [spec.inputs, ...spec.hidden, spec.outputs];
    for (let l = 0; l + 1 < widths.length; l++) {
      const [fanIn, fanOut] = [widths[l], widths[l + 1]];
      const kernel = tf.variable(tf.tensor2d(Float32Array.from(glorotUniform(rng, fanIn, fanOut)), [fanIn, fanOut], 'float32'), true);
      const bias = tf.variable(tf.zeros([fanOut], 'float32'), true);
      this.layers.push({ kernel, bias });
      this.entries.push({ name: `${spec.name}/layer${l}/kernel`, variable: kernel }, { name: `${spec.name}/layer${l}/bias`, variable: bias });
    }
  }

  forward(input: Jet): Jet {
    let z = input;
    const last = this.layers.length - 1;
    this.layers.forEach((layer, l) => {
      z = z.matMul(layer.kernel, layer.bias);
      if (l < last) z = this.spec.activation === 'tanh' ? z.tanh() : z.sin();
    });
    return z;
  }
}

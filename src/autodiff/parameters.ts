/**
 * The trainable variables of one or more networks, in a fixed order, with
 *   - flatten / unflatten to one Float64Array (for L-BFGS, src/numerics/lbfgs.ts),
 *   - gradient maps from tf.variableGrads flattened in the same order,
 *   - named weights for checkpoints (names are ours; tfjs variable names are left
 *     automatic so that several networks, or the same network built twice, never clash
 *     in tfjs's global variable registry).
 * Values cross the float32/float64 boundary here: tfjs variables are float32.
 */
import type * as TfModule from '@tensorflow/tfjs';
import type { Tf } from './tf.js';

export interface NamedWeight {
  name: string;
  tensor: TfModule.Tensor;
}

export interface ParameterEntry {
  name: string;
  variable: TfModule.Variable;
}

export class ParameterSet {
  readonly size: number;

  constructor(
    readonly tf: Tf,
    readonly entries: ParameterEntry[],
  ) {
    const seen = new Set<string>();
    for (const e of entries) {
      if (seen.has(e.name)) throw new Error(`duplicate parameter name ${e.name}`);
      seen.add(e.name);
    }
    this.size = entries.reduce((n, e) => n + e.variable.size, 0);
  }

  /** Several networks' parameters as one set (e.g. field net + both propagators for L-BFGS). */
  static join(...sets: ParameterSet[]): ParameterSet {
    return new ParameterSet(sets[0].tf, sets.flatMap((s) => s.entries));
  }

  /** The tfjs variables, for tf.variableGrads(f, varList). */
  variables(): TfModule.Variable[] {
    return this.entries.map((e) => e.variable);
  }

  /** All values, concatenated in entry order, row-major within each tensor. */
  flatten(): Float64Array {
    const out = new Float64Array(this.size);
    let o = 0;
    for (const e of this.entries) {
      out.set(e.variable.dataSync() as Float32Array, o);
      o += e.variable.size;
    }
    return out;
  }

  /** Assign all values from a vector laid out as by flatten() (rounded to float32). */
  unflatten(x: Float64Array): void {
    if (x.length !== this.size) throw new RangeError(`parameter vector has ${x.length} entries, the networks have ${this.size}`);
    const tf = this.tf;
    let o = 0;
    for (const e of this.entries) {
      const n = e.variable.size;
      tf.tidy(() => e.variable.assign(tf.tensor(Float32Array.from(x.subarray(o, o + n)), e.variable.shape, 'float32')));
      o += n;
    }
  }

  /**
   * Flatten the gradient map returned by tf.variableGrads (keyed by tfjs variable name).
   * A variable the loss did not touch has gradient zero.
   */
  flattenGradients(grads: TfModule.NamedTensorMap): Float64Array {
    const out = new Float64Array(this.size);
    let o = 0;
    for (const e of this.entries) {
      const g = grads[e.variable.name];
      if (g) out.set(g.dataSync() as Float32Array, o);
      o += e.variable.size;
    }
    return out;
  }

  /** The variables themselves under their checkpoint names (not copies). */
  namedWeights(): NamedWeight[] {
    return this.entries.map((e) => ({ name: e.name, tensor: e.variable }));
  }

  /** Assign from named tensors; every parameter must be present with its exact shape. */
  loadNamedWeights(weights: NamedWeight[] | TfModule.NamedTensorMap): void {
    const map = new Map<string, TfModule.Tensor>(Array.isArray(weights) ? weights.map((w) => [w.name, w.tensor]) : Object.entries(weights));
    const missing = this.entries.filter((e) => !map.has(e.name)).map((e) => e.name);
    if (missing.length) throw new Error(`checkpoint lacks weights: ${missing.join(', ')}`);
    const known = new Set(this.entries.map((e) => e.name));
    const extra = [...map.keys()].filter((k) => !known.has(k));
    if (extra.length) throw new Error(`checkpoint has weights this network does not: ${extra.join(', ')}`);
    for (const e of this.entries) {
      const t = map.get(e.name)!;
      if (t.shape.join('x') !== e.variable.shape.join('x')) {
        throw new Error(`weight ${e.name}: checkpoint shape [${t.shape}] differs from network shape [${e.variable.shape}]`);
      }
    }
    for (const e of this.entries) e.variable.assign(this.tf.cast(map.get(e.name)!, 'float32'));
  }

  dispose(): void {
    for (const e of this.entries) e.variable.dispose();
  }
}

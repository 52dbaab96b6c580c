/**
 * The field w(x) the MDE sees at each point of a point set: the field network's w_A or w_B,
 * by the species of the block at the point (or the prescribed field of a chain in given
 * fields), [n, 1] in kT per chain.
 *
 * 'detached' (the alternating strategy, and the default) passes no gradient from the MDE
 * to the field network; 'coupled' does. With frozen fields (the alternating strategy: the
 * field network changes only at field updates) w at a point set is the same every step, so
 * it is computed once per set and kept until invalidate(); the kept tensor is a constant, so
 * no gradient reaches the field network through it, exactly as with the detached form.
 */
import type * as TfModule from '@tensorflow/tfjs';
import { stopGradient } from '../../autodiff/stop-gradient.js';
import type { Tf } from '../../autodiff/tf.js';
import type { TrainConfig } from '../../io/schemas/train-config.js';
import type { ScftNetworks } from '../scft-networks.js';
import type { PointSet } from './point-set.js';

export class PointFields {
  /** Keep w per point set between steps (set by the alternating strategy). */
  frozen = false;
  private readonly kept = new Map<PointSet, TfModule.Tensor>();

  constructor(
    readonly tf: Tf,
    readonly nets: ScftNetworks,
    public coupling: TrainConfig['losses']['fieldInMde'],
  ) {}

  /** w of the block at each point of `set`: [n, 1]. */
  at(set: PointSet): TfModule.Tensor {
    const tf = this.tf;
    if (set.prescribedW) return set.prescribedW;
    if (!this.frozen) return this.fromNetwork(set);
    let w = this.kept.get(set);
    if (!w) {
      w = tf.keep(tf.tidy(() => stopGradient(tf, this.fromNetwork(set))));
      this.kept.set(set, w);
    }
    return w;
  }

  private fromNetwork(set: PointSet): TfModule.Tensor {
    const tf = this.tf;
    const wNet = this.nets.field!.forward(set.fieldFeatures!).v;
    const w = this.coupling === 'detached' ? stopGradient(tf, wNet) : wNet;
    const wA = tf.slice(w, [0, 0], [-1, 1]);
    const wB = tf.slice(w, [0, 1], [-1, 1]);
    return tf.add(tf.mul(set.maskA, wA), tf.mul(tf.sub(1, set.maskA), wB));
  }

  /** Drop every kept w (the field network changed). */
  invalidate(): void {
    for (const t of this.kept.values()) t.dispose();
    this.kept.clear();
  }

  /** Drop the kept w of one set (the set is about to be disposed). */
  forget(set: PointSet): void {
    this.kept.get(set)?.dispose();
    this.kept.delete(set);
  }
}

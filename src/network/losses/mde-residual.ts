/**
 * Residual of the MDE in ln q form (docs/physics.md, "Network solutions", with u = ln q):
 *   ∂q/∂s = D ∂²q/∂x² − w q   ⇔   r = ∂u/∂s − D (∂²u/∂x² + (∂u/∂x)²) + w = 0.
 * Units: s ∈ [0, 1], x in Rg, w in kT per chain, D = (b_K/b)² of the block at each point.
 */
import type * as TfModule from '@tensorflow/tfjs';
import type { Tf } from '../../autodiff/tf.js';
import type { Jet } from '../../autodiff/jet.js';

/** r at each point: u is a jet [n, 1] with dx, dxx, ds; D and w are [n, 1]. */
export function mdeResidual(tf: Tf, u: Jet, diffusivity: TfModule.Tensor, w: TfModule.Tensor): TfModule.Tensor {
  if (!u.dx || !u.dxx || !u.ds) throw new Error('mdeResidual needs the ∂x, ∂xx and ∂s channels');
  const laplacianOfLog = tf.add(u.dxx, tf.square(u.dx));
  return tf.add(tf.sub(u.ds, tf.mul(diffusivity, laplacianOfLog)), w);
}

/** Mean square of the residual: the "mde" loss term of one propagator. */
export function mdeLoss(tf: Tf, u: Jet, diffusivity: TfModule.Tensor, w: TfModule.Tensor): TfModule.Scalar {
  return tf.mean(tf.square(mdeResidual(tf, u, diffusivity, w))) as TfModule.Scalar;
}

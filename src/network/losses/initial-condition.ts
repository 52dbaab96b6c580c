/**
 * Soft initial condition of a propagator (docs/physics.md: q(x, 0) = 1), in ln q form:
 *   initial = mean over the x grid of u(x, 0)²,   u = ln q,
 * used when the network does not satisfy it by construction. Units: u dimensionless.
 */
import type * as TfModule from '@tensorflow/tfjs';
import type { Tf } from '../../autodiff/tf.js';

/** u0: values of u at s = 0 on the x grid, any shape (one or more propagators stacked). */
export function initialConditionLoss(tf: Tf, u0: TfModule.Tensor): TfModule.Scalar {
  return tf.mean(tf.square(u0)) as TfModule.Scalar;
}

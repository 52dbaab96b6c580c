/**
 * Soft periodicity of a propagator (docs/physics.md, "Network solutions"): with the
 * scaled x input the network is not periodic by construction, so the cell's two ends are
 * tied by a penalty on the values and slopes of u = ln q there,
 *   periodicity = mean over contour points s_i of
 *                 (u(0, s_i) − u(L, s_i))² + (∂x u(0, s_i) − ∂x u(L, s_i))².
 * Matching u and ∂x u is what a second-order equation in x needs at a periodic boundary.
 * Units: u dimensionless, ∂x u in 1/Rg (L is a few Rg, so both parts are of one size).
 */
import type * as TfModule from '@tensorflow/tfjs';
import type { Tf } from '../../autodiff/tf.js';
import type { Jet } from '../../autodiff/jet.js';

/** u: jet [2m, 1] with ∂x; rows [0, m) at x = 0 and rows [m, 2m) at x = L, same s_i in order. */
export function periodicityLoss(tf: Tf, u: Jet): TfModule.Scalar {
  if (!u.dx) throw new Error('periodicityLoss needs the ∂x channel');
  const m = u.v.shape[0] / 2;
  const gap = (c: TfModule.Tensor) => tf.sub(tf.slice(c, [0, 0], [m, -1]), tf.slice(c, [m, 0], [m, -1]));
  return tf.add(tf.mean(tf.square(gap(u.v))), tf.mean(tf.square(gap(u.dx)))) as TfModule.Scalar;
}

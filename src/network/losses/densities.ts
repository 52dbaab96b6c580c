/**
 * Densities from the network propagators on the fixed tensor grid (docs/physics.md):
 *   Q = (1/L) ∫ q(x, 1) dx,   φ_K(x) = (1/Q) Σ_i c^K_i q(x, s_i) q†(x, 1 − s_i),
 * with c^K the Simpson weights of physics/contour.ts (the one quadrature; tests/network check
 * these tensor densities against its float64 form). Grid values are laid out s-major:
 * row i holds the nx points at node s_i (q) or at node s'_i of the reversed chain (q†);
 * s'_i = 1 − s_{n−1−i}, so q†(x, 1 − s_i) is row n−1−i of the q† grid.
 */
import type * as TfModule from '@tensorflow/tfjs';
import type { Tf } from '../../autodiff/tf.js';

export interface GridDensities {
  /** [1, nx] each. */
  phiA: TfModule.Tensor;
  phiB: TfModule.Tensor;
  Q: TfModule.Scalar;
}

/**
 * logQ, logQDagger: [nodes·nx, 1] values of ln q and ln q† on the grid.
 * weightsA, weightsB: [1, nodes] Simpson weights per species (constant tensors).
 */
export function gridDensities(tf: Tf, logQ: TfModule.Tensor, logQDagger: TfModule.Tensor, nodes: number, nx: number, weightsA: TfModule.Tensor, weightsB: TfModule.Tensor): GridDensities {
  const u = tf.reshape(logQ, [nodes, nx]);
  const ud = tf.reverse(tf.reshape(logQDagger, [nodes, nx]), 0);
  const product = tf.exp(tf.add(u, ud));
  const Q = tf.mean(tf.exp(tf.slice(u, [nodes - 1, 0], [1, nx]))) as TfModule.Scalar;
  const phiA = tf.div(tf.matMul(weightsA, product), Q);
  const phiB = tf.div(tf.matMul(weightsB, product), Q);
  return { phiA, phiB, Q };
}

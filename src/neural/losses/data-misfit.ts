/**
 * Data misfit of inverse runs: mean over the n data points of w_i (φ_A(x_i) − d_i)², where
 * φ_A(x_i) = Σ_j φ_A(x_j) M_ji is the grid density carried to the data points by a fixed
 * linear map M (trigonometric interpolation with the instrument blur; numerics/
 * trig-interpolation.ts) and w_i = σ̄²/σ_i² are relative weights of mean 1.
 */
import type * as TfModule from '@tensorflow/tfjs';
import type { Tf } from '../backend.js';

export function dataMisfitLoss(tf: Tf, phiA: TfModule.Tensor, matrix: TfModule.Tensor, target: TfModule.Tensor, weight: TfModule.Tensor): TfModule.Scalar {
  const atData = tf.matMul(phiA, matrix);
  return tf.mean(tf.mul(weight, tf.square(tf.sub(atData, target)))) as TfModule.Scalar;
}

/**
 * The melt's field equations as loss terms (docs/physics.md, "The equations"), on the x
 * grid, in kT per chain. The self-consistency and gauge terms are divided by max(1, χN)²
 * so that every term is O(φ²) whatever χN is (they compare fields of size ~χN).
 *   incompressibility:  mean (φ_A + φ_B − 1)²
 *   selfConsistency:    mean (w_A − w_B − χN (φ_B − φ_A) + 2h)² / max(1, χN)²
 *                       (h: a film's surface field, physics/scft-equations.ts; 0 in a periodic cell)
 *   gauge:              (mean (w_A + w_B)/2)² / max(1, χN)²
 * A one-species melt keeps incompressibility (φ_K − 1)² and the gauge mean w_K = 0.
 */
import type * as TfModule from '@tensorflow/tfjs';
import type { Tf } from '../../autodiff/tf.js';

export function incompressibilityLoss(tf: Tf, phiA: TfModule.Tensor, phiB: TfModule.Tensor | null): TfModule.Scalar {
  const total = phiB ? tf.add(phiA, phiB) : phiA;
  return tf.mean(tf.square(tf.sub(total, 1))) as TfModule.Scalar;
}

export function selfConsistencyLoss(tf: Tf, chiN: number, wA: TfModule.Tensor, wB: TfModule.Tensor, phiA: TfModule.Tensor, phiB: TfModule.Tensor, h: TfModule.Tensor | null = null): TfModule.Scalar {
  const scale = 1 / Math.max(1, chiN) ** 2;
  const plain = tf.sub(tf.sub(wA, wB), tf.mul(tf.sub(phiB, phiA), chiN));
  const r = h ? tf.add(plain, tf.mul(h, 2)) : plain;
  return tf.mul(tf.mean(tf.square(r)), scale) as TfModule.Scalar;
}

export function gaugeLoss(tf: Tf, chiN: number, wA: TfModule.Tensor, wB: TfModule.Tensor | null): TfModule.Scalar {
  const scale = 1 / Math.max(1, chiN) ** 2;
  const pressure = wB ? tf.mul(tf.add(wA, wB), 0.5) : wA;
  return tf.mul(tf.square(tf.mean(pressure)), scale) as TfModule.Scalar;
}

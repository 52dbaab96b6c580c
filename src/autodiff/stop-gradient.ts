/**
 * Identity in the forward pass, zero gradient in the backward pass (tfjs 4.22 has no
 * stop-gradient op). Lets a loss treat a network output as a constant.
 */
import type * as TfModule from '@tensorflow/tfjs';
import type { Tf } from './tf.js';

export function stopGradient(tf: Tf, x: TfModule.Tensor): TfModule.Tensor {
  const f = tf.customGrad(((a: TfModule.Tensor) => ({ value: tf.clone(a), gradFunc: (dy: TfModule.Tensor) => tf.zerosLike(dy) })) as unknown as Parameters<Tf['customGrad']>[0]);
  return f(x) as TfModule.Tensor;
}

/**
 * Σ over the rows of an [n, m] float32 tensor as [1, m], one f32x4 pass (issue 7).
 *
 * fast-ops.ts sums rows as the matMul ones[1, n]·a, which beats tfjs's Sum kernel on WASM
 * but still pays XNNPACK's packing of the right operand a (an [n, m] copy plus set-up) on
 * every call, since a is new each time; a plain accumulation is one read of a.
 */
import type * as TfModule from '@tensorflow/tfjs';
import type { Tf } from '../tf.js';
import { add, heapOffset, heapView, load, registerHeapKernel, rowLoopFunction, store } from './heap-module.js';
import type { HeapExports, WasmBackend } from './heap-module.js';

type TensorInfo = TfModule.TensorInfo;

const KERNEL = 'MesofieldColumnSums';

/** out[c] += x[p, c] over all points p (out zeroed by the caller). */
export const columnSumsWat = rowLoopFunction('column_sums', ['x', 'out'], [], [store('out', add(load('out', true), load('x')), true)]);

/** Register the kernel and its gradient on the WASM backend (once, from wasm/kernels.ts). */
export function registerColumnSumsKernel(tf: Tf, backend: WasmBackend, heap: HeapExports): void {
  const offset = (t: TensorInfo) => heapOffset(backend, t);
  registerHeapKernel(tf, KERNEL, (inputs) => {
    const x = inputs.x as TensorInfo;
    const [n, m] = x.shape;
    const out = backend.makeOutput([1, m], 'float32');
    heapView(backend, out).fill(0);
    heap.column_sums(n, m, offset(x), offset(out));
    return out;
  });
  // d/dx Σ_p x[p, c] = 1: the gradient is dy broadcast over the rows.
  tf.registerGradient({
    kernelName: KERNEL,
    inputsToSave: ['x'],
    gradFunc: (dy, saved) => ({ x: () => tf.broadcastTo(dy as TfModule.Tensor, saved[0].shape) }),
  });
}

/** Σ over rows as [1, m] by the kernel, or null where it does not apply (m not a multiple of 4). Call through wasm/kernels.ts. */
export function runColumnSums(tf: Tf, a: TfModule.Tensor): TfModule.Tensor | null {
  if (a.rank !== 2 || a.dtype !== 'float32' || a.shape[1]! % 4 !== 0) return null;
  return tf.engine().runKernel(KERNEL, { x: a }) as TfModule.Tensor;
}

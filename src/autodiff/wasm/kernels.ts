/**
 * Everything mesofield adds to the tfjs WASM backend when it starts (issue 7): copies that
 * share memory, and the kernels of our own (fused jet tanh, column sums, dense layer products, Adam update), assembled into
 * one module on the backend's heap. A failure to build our kernels is not fatal: the
 * trainer then runs on tfjs's kernels alone and says so.
 */
import type { Tf } from '../backend.js';
import { adamWat, installAdamKernel } from './adam-kernel.js';
import { installAliasingCopies } from './aliasing-copies.js';
import { columnSumsWat, installColumnSumsKernel } from './column-sums-kernel.js';
import { instantiateOnHeap, loadAssembler } from './heap-module.js';
import type { WasmBackend } from './heap-module.js';
import { installJetTanhKernels, jetTanhWat } from './jet-tanh-kernel.js';
import { installMatMulKernel, matMulWatText } from './matmul-kernel.js';
import { installWeightGradientKernel, weightGradientWatText } from './weight-gradient-kernel.js';

/** Returns null when all is installed, else why our kernels are not in use. */
export async function installWasmExtras(tf: Tf): Promise<string | null> {
  installAliasingCopies(tf);
  try {
    await loadAssembler();
    const backend = tf.backend() as unknown as WasmBackend;
    const heap = instantiateOnHeap(backend, `(module (import "env" "memory" (memory 1))\n${columnSumsWat}\n${weightGradientWatText}\n${matMulWatText}\n${adamWat}\n${jetTanhWat()})`);
    installColumnSumsKernel(tf, backend, heap);
    installJetTanhKernels(tf, backend, heap);
    installWeightGradientKernel(tf, backend, heap);
    installMatMulKernel(tf, backend, heap);
    installAdamKernel(tf, backend, heap);
    return null;
  } catch (err) {
    return `mesofield's WASM kernels not built (${err instanceof Error ? err.message.split('\n')[0] : String(err)}); tfjs kernels only`;
  }
}

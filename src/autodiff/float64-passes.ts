/**
 * Loads every float64 WebAssembly kernel the second-order code uses, before it builds its
 * networks and systems: the normal matrices and Cholesky (numerics/float64-kernels.ts) and the
 * jet passes of JetMlp64 (jet-mlp64-kernel.ts). Each gives its JS form's results to the last
 * bit; without WebAssembly SIMD the JS forms run. A network made before this resolves keeps
 * the JS passes.
 */
import { loadFloat64Kernels } from '../numerics/float64-kernels.js';
import { loadJetKernels } from './jet-mlp64-kernel.js';

export async function loadFloat64Passes(): Promise<void> {
  await Promise.all([loadFloat64Kernels(), loadJetKernels()]);
}

/**
 * The one interface to mesofield's additions to the tfjs WASM backend (issue 7): copies that
 * share memory (aliasing-copies.ts) and the kernels of our own — fused jet tanh, column
 * sums, dense-layer products, Adam update — assembled into one module on the backend's heap.
 *
 *   installWasmKernels(tf, versions)  once, when the WASM backend starts (autodiff/backend.ts)
 *   wasmKernels(tf)                   the kernels, or null: then the caller uses tfjs ops
 *
 * The install state lives here and nowhere else. The kernels reach into the backend's
 * internals (its heap, BackendWasm.getMemoryOffset/makeOutput/incRef, the Identity, Cast and
 * Sigmoid kernels), which tfjs does not promise to keep between releases: they are written
 * against tfjs 4.22.0 and installed only when both tfjs-core and tfjs-backend-wasm are that
 * version. Otherwise, or when the module fails to build, the install returns a warning for
 * the user and every caller keeps to tfjs's own ops (same results to float32 rounding,
 * slower).
 */
import type { Tf } from '../tf.js';
import { adamWat, registerAdamKernel, runAdamUpdate } from './adam-kernel.js';
import { installAliasingCopies } from './aliasing-copies.js';
import { columnSumsWat, registerColumnSumsKernel, runColumnSums } from './column-sums-kernel.js';
import { instantiateOnHeap, loadAssembler } from './heap-module.js';
import type { WasmBackend } from './heap-module.js';
import { jetTanhWat, registerJetTanhKernels, runJetTanh } from './jet-tanh-kernel.js';
import { matMulWatText, registerMatMulKernel, runMatMul } from './matmul-kernel.js';
import { registerWeightGradientKernel, runWeightGradient, weightGradientWatText } from './weight-gradient-kernel.js';

/** The tfjs release whose WASM backend internals the kernels were written against. */
export const KERNELS_TFJS_VERSION = '4.22.0';

/** The versions that matter: tfjs-core (kernel registry, engine) and the WASM backend. */
export interface TfjsVersions {
  core: string;
  wasmBackend: string;
}

type InstallState = { kind: 'not-installed' } | { kind: 'ready' } | { kind: 'unavailable'; reason: string };

let state: InstallState = { kind: 'not-installed' };

/** Why the kernels cannot be used with these versions, or null when they match. */
export function versionMismatch(v: TfjsVersions): string | null {
  const found = [
    ['@tensorflow/tfjs-core', v.core],
    ['@tensorflow/tfjs-backend-wasm', v.wasmBackend],
  ].filter(([, version]) => version !== KERNELS_TFJS_VERSION);
  if (found.length === 0) return null;
  return (
    `mesofield's WASM kernels were written against tfjs ${KERNELS_TFJS_VERSION}, but this is ${found.map(([pkg, version]) => `${pkg} ${version}`).join(' and ')}; ` +
    `training runs on tfjs's own kernels (same results to float32 rounding, slower). Install tfjs ${KERNELS_TFJS_VERSION} to use them`
  );
}

/**
 * Install once, on the active WASM backend of `tf`. Returns null when everything is in use,
 * else the reason it is not (a warning for the user); later calls return the first outcome.
 */
export async function installWasmKernels(tf: Tf, versions: TfjsVersions): Promise<string | null> {
  if (state.kind === 'ready') return null;
  if (state.kind === 'unavailable') return state.reason;
  const mismatch = versionMismatch(versions);
  if (mismatch) {
    state = { kind: 'unavailable', reason: mismatch };
    return mismatch;
  }
  // The copies need no assembler: they stay even when the kernels below fail to build.
  installAliasingCopies(tf);
  try {
    const assembler = await loadAssembler();
    const backend = tf.backend() as unknown as WasmBackend;
    const heap = instantiateOnHeap(assembler, backend, `(module (import "env" "memory" (memory 1))\n${columnSumsWat}\n${weightGradientWatText}\n${matMulWatText}\n${adamWat}\n${jetTanhWat()})`);
    registerColumnSumsKernel(tf, backend, heap);
    registerJetTanhKernels(tf, backend, heap);
    registerWeightGradientKernel(tf, backend, heap);
    registerMatMulKernel(tf, backend, heap);
    registerAdamKernel(tf, backend, heap);
    state = { kind: 'ready' };
    return null;
  } catch (err) {
    const reason = `mesofield's WASM kernels not built (${err instanceof Error ? err.message.split('\n')[0] : String(err)}); tfjs kernels only`;
    state = { kind: 'unavailable', reason };
    return reason;
  }
}

/**
 * The kernels. Each returns null for shapes it does not take (its file says which); the
 * caller then uses the straightforward tfjs ops.
 */
export interface WasmKernels {
  /** a·w (+ bias), no tfjs gradient (matmul-kernel.ts). */
  matMul: typeof runMatMul;
  /** aᵀ·dy, inside gradient functions (weight-gradient-kernel.ts). */
  weightGradient: typeof runWeightGradient;
  /** Σ over rows as [1, m], with its gradient (column-sums-kernel.ts). */
  columnSums: typeof runColumnSums;
  /** Jet.tanh fused, with its gradient (jet-tanh-kernel.ts). */
  jetTanh: typeof runJetTanh;
  /** One Adam update of one parameter tensor (adam-kernel.ts). */
  adamUpdate: typeof runAdamUpdate;
}

const KERNELS: WasmKernels = { matMul: runMatMul, weightGradient: runWeightGradient, columnSums: runColumnSums, jetTanh: runJetTanh, adamUpdate: runAdamUpdate };

/** The kernels when installed and the active backend of `tf` is WASM, else null. */
export function wasmKernels(tf: Tf): WasmKernels | null {
  return state.kind === 'ready' && tf.getBackend() === 'wasm' ? KERNELS : null;
}

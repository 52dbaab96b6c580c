/**
 * Copies that share memory on the WASM backend (issue 7).
 *
 * tfjs saves every tensor a gradient needs by cloning it (engine.saveTensorsForBackwardMode
 * → Identity), and every Mul gradient casts its operands to float32 (Cast, same dtype).
 * The WASM backend of tfjs 4.22 implements both as full memory copies; in a training step
 * that is one copy per saved activation, each landing on a fresh region of the heap. Its
 * tensors are immutable and reference-counted (BackendWasm.incRef / disposeData), so a copy
 * can be the same buffer with one more reference, which is how tfjs's own plain-JS backend
 * implements Identity. Values, shapes and dtypes are unchanged; only the copy goes.
 */
import type { Tf } from '../backend.js';

interface WasmData {
  dataId: object;
  shape: number[];
  dtype: string;
}
interface RefCounting {
  incRef(dataId: object): void;
}

let installed = false;

/** Replace the WASM Identity kernel, and Cast to the same dtype, by shared references. */
export function installAliasingCopies(tf: Tf): void {
  if (installed) return;
  const cast = tf.getKernel('Cast', 'wasm');
  const identity = tf.getKernel('Identity', 'wasm');
  if (!cast || !identity) return;
  const share = (x: WasmData, backend: RefCounting): WasmData => {
    backend.incRef(x.dataId);
    return { dataId: x.dataId, shape: x.shape, dtype: x.dtype };
  };
  tf.unregisterKernel('Identity', 'wasm');
  tf.registerKernel({
    kernelName: 'Identity',
    backendName: 'wasm',
    kernelFunc: (args) => {
      const x = args.inputs.x as unknown as WasmData;
      // Strings live outside the heap: keep the backend's own path for them.
      return x.dtype === 'string' ? identity.kernelFunc(args) : (share(x, args.backend as unknown as RefCounting) as never);
    },
  });
  tf.unregisterKernel('Cast', 'wasm');
  tf.registerKernel({
    kernelName: 'Cast',
    backendName: 'wasm',
    kernelFunc: (args) => {
      const x = args.inputs.x as unknown as WasmData;
      const same = x.dtype === (args.attrs as { dtype?: string }).dtype && x.dtype !== 'string';
      return same ? (share(x, args.backend as unknown as RefCounting) as never) : cast.kernelFunc(args);
    },
  });
  installed = true;
}

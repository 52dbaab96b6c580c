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
import type { Tf } from '../tf.js';

interface WasmData {
  dataId: object;
  shape: number[];
  dtype: string;
}
interface RefCounting {
  incRef(dataId: object): void;
}

/** Replace the WASM Identity kernel, and Cast to the same dtype, by shared references (once, from wasm/kernels.ts). */
export function installAliasingCopies(tf: Tf): void {
  const cast = tf.getKernel('Cast', 'wasm');
  const identity = tf.getKernel('Identity', 'wasm');
  if (!cast || !identity) return;
  // Strings live outside the heap: the backend's own path stays for them.
  const alias = (name: string, original: typeof cast, shares: (x: WasmData, attrs: { dtype?: string }) => boolean) => {
    tf.unregisterKernel(name, 'wasm');
    tf.registerKernel({
      kernelName: name,
      backendName: 'wasm',
      kernelFunc: (args) => {
        const x = args.inputs.x as unknown as WasmData;
        if (x.dtype === 'string' || !shares(x, args.attrs as { dtype?: string })) return original.kernelFunc(args);
        (args.backend as unknown as RefCounting).incRef(x.dataId);
        return { dataId: x.dataId, shape: x.shape, dtype: x.dtype } as never;
      },
    });
  };
  alias('Identity', identity, () => true);
  alias('Cast', cast, (x, attrs) => x.dtype === attrs.dtype);
}

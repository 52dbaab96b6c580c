/**
 * Kernels of our own on the tfjs WASM backend's heap (issue 7).
 *
 * A module written in WebAssembly text (SIMD, f32x4) is assembled by wabt and instantiated
 * with the backend's own WebAssembly.Memory as its memory, so it reads and writes tfjs
 * tensors in place: a kernel is handed byte offsets (BackendWasm.getMemoryOffset) and
 * allocates nothing. Our modules use no linear-memory stack and no data segments; every
 * byte they touch belongs to a tensor the calling kernel owns.
 */
import type * as TfModule from '@tensorflow/tfjs';
import type { Tf } from '../tf.js';

type TensorInfo = TfModule.TensorInfo;

/** The parts of tfjs-backend-wasm's BackendWasm the kernels use. */
export interface WasmBackend {
  wasm: { asm: { memory: WebAssembly.Memory } };
  makeOutput(shape: number[], dtype: 'float32'): TensorInfo;
  disposeData(dataId: object, force?: boolean): boolean;
  getMemoryOffset(dataId: object): number;
}

type WabtInit = typeof import('wabt');
export type Assembler = Awaited<ReturnType<WabtInit>>;

/** Load the WebAssembly text assembler (async; done once, when the WASM backend starts: wasm/kernels.ts). */
export async function loadAssembler(): Promise<Assembler> {
  // A CommonJS package (`export =`): its function arrives as the default export.
  const mod = (await import('wabt')) as unknown as { default: WabtInit };
  return mod.default();
}

export type HeapExports = Record<string, (...args: number[]) => void>;

/** Assemble `wat` and instantiate it on the backend's memory. */
export function instantiateOnHeap(assembler: Assembler, backend: WasmBackend, wat: string): HeapExports {
  const parsed = assembler.parseWat('mesofield-kernels.wat', wat, { simd: true });
  try {
    parsed.validate();
    const { buffer } = parsed.toBinary({});
    const module = new WebAssembly.Module(buffer);
    return new WebAssembly.Instance(module, { env: { memory: backend.wasm.asm.memory } }).exports as unknown as HeapExports;
  } finally {
    parsed.destroy();
  }
}

/** Byte offset of a tensor's data in the heap (what our kernels are handed). */
export function heapOffset(backend: WasmBackend, t: TensorInfo): number {
  return backend.getMemoryOffset(t.dataId);
}

/** Register `run` as the tfjs kernel `name` on the WASM backend (inputs by name, attributes). */
export function registerHeapKernel(tf: Tf, name: string, run: (inputs: Record<string, TensorInfo>, attrs: Record<string, unknown>) => TensorInfo | TensorInfo[]): void {
  tf.registerKernel({ kernelName: name, backendName: 'wasm', kernelFunc: ({ inputs, attrs }) => run(inputs as Record<string, TensorInfo>, attrs as Record<string, unknown>) });
}

/** A float32 view of a tensor's data (valid until the next allocation may grow the heap). */
export function heapView(backend: WasmBackend, t: TensorInfo): Float32Array {
  const size = t.shape.reduce((a, b) => a * b, 1);
  return new Float32Array(backend.wasm.asm.memory.buffer, heapOffset(backend, t), size);
}

// ---- WebAssembly text helpers for elementwise f32x4 loops -------------------------------

/** f32x4 constant. */
export const splat = (c: number): string => `(f32x4.splat (f32.const ${c}))`;
export const mul = (a: string, b: string): string => `(f32x4.mul ${a} ${b})`;
export const add = (a: string, b: string): string => `(f32x4.add ${a} ${b})`;
export const sub = (a: string, b: string): string => `(f32x4.sub ${a} ${b})`;
export const get = (name: string): string => `(local.get $${name})`;
export const set = (name: string, v: string): string => `(local.set $${name} ${v})`;

/** Address of the current 4 floats of pointer `p`: full tensors step with $o, rows with $r. */
const at = (p: string, row: boolean) => `(i32.add (local.get $${p}) (local.get $${row ? 'r' : 'o'}))`;
export const load = (p: string, row = false): string => `(v128.load ${at(p, row)})`;
export const store = (p: string, v: string, row = false): string => `(v128.store ${at(p, row)} ${v})`;

/**
 * The update of a register block of `rows` × 8 outputs by one rank-one term:
 * acc(r, h) += splat(a_r) · vector h for h = 0, 1, with a_r the float at scalarAt(r) (two f32x4 vectors of 4 columns),
 * the inner step of both blocked matrix products (matmul-kernel.ts, weight-gradient-kernel.ts).
 */
export function rankOneBlockUpdate(rows: number, scalarAt: (r: number) => string, acc: (r: number, h: number) => string, vectors: [string, string], after: (r: number) => string = () => ''): string {
  return Array.from({ length: rows }, (_, r) =>
    [
      // One float loaded into all four lanes (v128.load32_splat takes `offset=… address`).
      `(local.set $s (v128.load32_splat ${scalarAt(r)}))`,
      ...[0, 1].map((h) => `(local.set ${acc(r, h)} (f32x4.add (local.get ${acc(r, h)}) (f32x4.mul (local.get $s) (local.get ${vectors[h]}))))`),
      after(r),
    ].join(' '),
  ).join('\n            ');
}

/**
 * A function looping over an [n, h] row-major float32 array, 4 columns at a time
 * (h a positive multiple of 4): $o is the byte offset of the current 4 floats in a full
 * [n, h] tensor, $r the offset within one row (for [1, h] tensors broadcast over rows).
 */
export function rowLoopFunction(name: string, pointers: string[], locals: string[], body: string[]): string {
  const params = ['n', 'h', ...pointers].map((p) => `(param $${p} i32)`).join(' ');
  const decl = [...['o', 'r', 'end', 'rowEnd'].map((l) => `(local $${l} i32)`), ...locals.map((l) => `(local $${l} v128)`)].join(' ');
  return `(func (export "${name}") ${params} ${decl}
  (local.set $end (i32.shl (i32.mul (local.get $n) (local.get $h)) (i32.const 2)))
  (local.set $rowEnd (i32.shl (local.get $h) (i32.const 2)))
  (block $done (loop $rows
    (br_if $done (i32.ge_u (local.get $o) (local.get $end)))
    (local.set $r (i32.const 0))
    (loop $cols
      ${body.join('\n      ')}
      (local.set $o (i32.add (local.get $o) (i32.const 16)))
      (local.set $r (i32.add (local.get $r) (i32.const 16)))
      (br_if $cols (i32.lt_u (local.get $r) (local.get $rowEnd))))
    (br $rows))))`;
}

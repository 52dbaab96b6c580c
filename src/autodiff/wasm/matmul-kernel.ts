/**
 * C = A·W (+ b) for a tall A [n, k] and a small W [k, m] (a dense layer's forward pass and
 * its input gradient dy·Wᵀ), as one register-blocked f32x4 kernel (issue 7).
 *
 * XNNPACK's matMul on tfjs's WASM backend builds and caches an operator keyed by the right
 * operand; a layer's W changes at every optimiser step, so each call pays the set-up and
 * packing again. Here each 4 × 8 block of C is accumulated in eight f32x4 registers, started
 * from the bias when there is one, over the k columns of A: the row-oriented (ijk / saxpy)
 * form of the product (Golub & Van Loan, "Matrix Computations", 4th ed., §1.1.11).
 * Needs m a multiple of 8 (rows beyond the last multiple of 4 go one at a time), or m = 1
 * with k a multiple of 4 (the one-column form below).
 */
import type * as TfModule from '@tensorflow/tfjs';
import type { Tf } from '../tf.js';
import { heapOffset, rankOneBlockUpdate, registerHeapKernel } from './heap-module.js';
import type { HeapExports, WasmBackend } from './heap-module.js';

type TensorInfo = TfModule.TensorInfo;

const KERNEL = 'MesofieldMatMul';

/** The block loop for `rows` rows of C at a time (4, then 1 for the remainder). */
function blockLoop(rows: number, label: string): string {
  const acc = (r: number, h: number) => `$c${r}${h}`;
  const rowPtr = (r: number) => `$pa${r}`;
  const cOffset = (r: number, h: number) =>
    `offset=${16 * h} (i32.add (local.get $c) (i32.shl (i32.add (i32.mul (i32.add (local.get $p) (i32.const ${r})) (local.get $m)) (local.get $j)) (i32.const 2)))`;
  const init = Array.from({ length: rows }, (_, r) =>
    [0, 1].map((h) => `(local.set ${acc(r, h)} (if (result v128) (local.get $b) (then (v128.load offset=${16 * h} (i32.add (local.get $b) (i32.shl (local.get $j) (i32.const 2))))) (else (v128.const i32x4 0 0 0 0))))`).join(' '),
  ).join('\n        ');
  const ptrs = Array.from({ length: rows }, (_, r) => `(local.set ${rowPtr(r)} (i32.add (local.get $a) (i32.shl (i32.mul (i32.add (local.get $p) (i32.const ${r})) (local.get $k)) (i32.const 2))))`).join(' ');
  const update = rankOneBlockUpdate(rows, (r) => `(local.get ${rowPtr(r)})`, acc, ['$w0', '$w1'], (r) => `(local.set ${rowPtr(r)} (i32.add (local.get ${rowPtr(r)}) (i32.const 4)))`);
  const write = Array.from({ length: rows }, (_, r) => [0, 1].map((h) => `(v128.store ${cOffset(r, h)} (local.get ${acc(r, h)}))`).join(' ')).join('\n        ');
  return `(block $${label}_done (loop $${label}_rows
    (br_if $${label}_done (i32.gt_u (i32.add (local.get $p) (i32.const ${rows})) (local.get $n)))
    (local.set $j (i32.const 0))
    (loop $${label}_cols
      ${init}
      ${ptrs}
      (local.set $pw (i32.add (local.get $w) (i32.shl (local.get $j) (i32.const 2))))
      (local.set $q (i32.const 0))
      (loop $${label}_inner
        (local.set $w0 (v128.load (local.get $pw)))
        (local.set $w1 (v128.load offset=16 (local.get $pw)))
            ${update}
        (local.set $pw (i32.add (local.get $pw) (local.get $sw)))
        (br_if $${label}_inner (i32.lt_u (local.tee $q (i32.add (local.get $q) (i32.const 1))) (local.get $k))))
      ${write}
      (br_if $${label}_cols (i32.lt_u (local.tee $j (i32.add (local.get $j) (i32.const 8))) (local.get $m))))
    (local.set $p (i32.add (local.get $p) (i32.const ${rows})))
    (br $${label}_rows)))`;
}

function matMulWat(): string {
  const locals = ['$p', '$j', '$q', '$pw', '$sw', '$pa0', '$pa1', '$pa2', '$pa3'].map((l) => `(local ${l} i32)`).join(' ');
  const vlocals = ['$s', '$w0', '$w1', ...[0, 1, 2, 3].flatMap((r) => [`$c${r}0`, `$c${r}1`])].map((l) => `(local ${l} v128)`).join(' ');
  // $b = 0: no bias (the heap's first bytes are never a tensor's).
  return `(func (export "mat_mul") (param $n i32) (param $k i32) (param $m i32) (param $a i32) (param $w i32) (param $b i32) (param $c i32)
  ${locals} ${vlocals}
  (local.set $sw (i32.shl (local.get $m) (i32.const 2)))
  ${blockLoop(4, 'four')}
  ${blockLoop(1, 'one')})`;
}

/**
 * One output column (a network's last layer, m = 1): c[p] = Σ_q a[p, q]·w[q] (+ b), f32x4
 * over q and the four lanes added at the end. Needs k a multiple of 4.
 */
const matVecWat = `(func (export "mat_vec") (param $n i32) (param $k i32) (param $a i32) (param $w i32) (param $b i32) (param $c i32)
  (local $p i32) (local $q i32) (local $pa i32) (local $kb i32) (local $bias f32) (local $acc v128)
  (local.set $kb (i32.shl (local.get $k) (i32.const 2)))
  (local.set $bias (if (result f32) (local.get $b) (then (f32.load (local.get $b))) (else (f32.const 0))))
  (local.set $pa (local.get $a))
  (loop $rows
    (local.set $acc (v128.const i32x4 0 0 0 0))
    (local.set $q (i32.const 0))
    (loop $inner
      (local.set $acc (f32x4.add (local.get $acc) (f32x4.mul (v128.load (i32.add (local.get $pa) (local.get $q))) (v128.load (i32.add (local.get $w) (local.get $q))))))
      (br_if $inner (i32.lt_u (local.tee $q (i32.add (local.get $q) (i32.const 16))) (local.get $kb))))
    (f32.store (i32.add (local.get $c) (i32.shl (local.get $p) (i32.const 2)))
      (f32.add (local.get $bias)
        (f32.add (f32.add (f32x4.extract_lane 0 (local.get $acc)) (f32x4.extract_lane 1 (local.get $acc)))
                 (f32.add (f32x4.extract_lane 2 (local.get $acc)) (f32x4.extract_lane 3 (local.get $acc))))))
    (local.set $pa (i32.add (local.get $pa) (local.get $kb)))
    (br_if $rows (i32.lt_u (local.tee $p (i32.add (local.get $p) (i32.const 1))) (local.get $n)))))`;

export const matMulWatText = `${matMulWat()}\n${matVecWat}`;

/** Register the kernel on the WASM backend (once, from wasm/kernels.ts). */
export function registerMatMulKernel(tf: Tf, backend: WasmBackend, heap: HeapExports): void {
  const offset = (t: TensorInfo) => heapOffset(backend, t);
  registerHeapKernel(tf, KERNEL, (inputs) => {
    const [a, w, b] = [inputs.a as TensorInfo, inputs.w as TensorInfo, inputs.b as TensorInfo | undefined];
    const [n, k] = a.shape;
    const m = w.shape[1];
    const c = backend.makeOutput([n, m], 'float32');
    if (m === 1) heap.mat_vec(n, k, offset(a), offset(w), b ? offset(b) : 0, offset(c));
    else heap.mat_mul(n, k, m, offset(a), offset(w), b ? offset(b) : 0, offset(c));
    return c;
  });
}

/**
 * a·w (+ bias [m]) by the kernel, or null where it does not apply (shapes above). No tfjs
 * gradient: callers supply theirs. Call through wasm/kernels.ts.
 */
export function runMatMul(tf: Tf, a: TfModule.Tensor, w: TfModule.Tensor, bias?: TfModule.Tensor): TfModule.Tensor | null {
  if (a.rank !== 2 || w.rank !== 2 || a.dtype !== 'float32' || w.dtype !== 'float32') return null;
  const [n, k] = a.shape as [number, number];
  const m = w.shape[1]!;
  const fits = m === 1 ? k % 4 === 0 : m % 8 === 0;
  if (n < 1 || k < 1 || w.shape[0] !== k || !fits) return null;
  if (bias && (bias.size !== m || bias.dtype !== 'float32')) return null;
  return tf.engine().runKernel(KERNEL, bias ? { a, w, b: bias } : { a, w }) as TfModule.Tensor;
}

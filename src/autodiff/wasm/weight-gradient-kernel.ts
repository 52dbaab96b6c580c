/**
 * The weight gradient of a dense layer, dW = aᵀ·dy (a [n, in], dy [n, out], dW [in, out]),
 * as one register-blocked f32x4 kernel (issue 7).
 *
 * On tfjs's WASM backend this product is a transpose of a plus an XNNPACK matMul whose right
 * operand, dy, is new at every call and so is packed anew each time; measured in the step
 * profile the pair costs about 2.5× a forward matMul of the same size. Here each 4 × 8 block
 * of dW is accumulated in eight f32x4 registers over one pass down the rows of a and dy,
 * reading both where they lie: the outer-product form of the product (Golub & Van Loan,
 * "Matrix Computations", 4th ed., §1.1.15, the outer-product (kji-type) matrix product).
 * Needs out a multiple of 8 (blocks of 4 rows of dW, then single rows), or out = 1 with in a
 * multiple of 4 (the one-column form below); other shapes keep the tfjs path.
 */
import type * as TfModule from '@tensorflow/tfjs';
import type { Tf } from '../tf.js';
import { heapOffset, heapView, rankOneBlockUpdate, registerHeapKernel } from './heap-module.js';
import type { HeapExports, WasmBackend } from './heap-module.js';

type TensorInfo = TfModule.TensorInfo;

const KERNEL = 'MesofieldWeightGradient';
const ROWS = 4;
/**
 * Points per pass: 64 rows of a and dy at 64 columns are 32 KiB, a core's L1 data cache.
 * Measured for 4096 × 64 (µs per call, separate runs): 64 rows 1116–1166 (three runs), 128
 * rows 1151–1255 (four), 256 rows 1352–1402 (four), 1024 rows 1678 (one).
 */
const CHUNK = 64;

/** The pass over rows i of dW in blocks of `rows` (4, then 1 for the remainder of in). */
function rowBlocks(rows: number, label: string): string {
  const acc = (r: number, h: number) => `$acc${r}${h}`;
  // dW[(i + r)·out + j (+ 4)]: the block at row i, column j.
  const cell = (r: number, h: number) => `offset=${16 * h} (i32.add (local.get $dw) (i32.shl (i32.add (i32.mul (i32.add (local.get $i) (i32.const ${r})) (local.get $out)) (local.get $j)) (i32.const 2)))`;
  const each = (f: (r: number) => string, sep: string) => Array.from({ length: rows }, (_, r) => f(r)).join(sep);
  const read = each((r) => [0, 1].map((h) => `(local.set ${acc(r, h)} (v128.load ${cell(r, h)}))`).join(' '), '\n        ');
  const update = rankOneBlockUpdate(rows, (r) => `offset=${4 * r} (local.get $pa)`, acc, ['$d0', '$d1']);
  const write = each((r) => [0, 1].map((h) => `(v128.store ${cell(r, h)} (local.get ${acc(r, h)}))`).join(' '), '\n        ');
  return `(block $${label}_done (loop $${label}_rows
      (br_if $${label}_done (i32.gt_u (i32.add (local.get $i) (i32.const ${rows})) (local.get $in)))
      (local.set $j (i32.const 0))
      (loop $${label}_cols
        ${read}
        (local.set $pa (i32.add (local.get $a) (i32.shl (i32.add (i32.mul (local.get $p0) (local.get $in)) (local.get $i)) (i32.const 2))))
        (local.set $pd (i32.add (local.get $dy) (i32.shl (i32.add (i32.mul (local.get $p0) (local.get $out)) (local.get $j)) (i32.const 2))))
        (local.set $p (local.get $p0))
        (loop $${label}_points
            (local.set $d0 (v128.load (local.get $pd)))
            (local.set $d1 (v128.load offset=16 (local.get $pd)))
            ${update}
          (local.set $pa (i32.add (local.get $pa) (local.get $sa)))
          (local.set $pd (i32.add (local.get $pd) (local.get $sd)))
          (br_if $${label}_points (i32.lt_u (local.tee $p (i32.add (local.get $p) (i32.const 1))) (local.get $p1))))
        ${write}
        (br_if $${label}_cols (i32.lt_u (local.tee $j (i32.add (local.get $j) (i32.const 8))) (local.get $out))))
      (local.set $i (i32.add (local.get $i) (i32.const ${rows})))
      (br $${label}_rows)))`;
}

function weightGradientWat(): string {
  const accs = [0, 1, 2, 3].flatMap((r) => [`$acc${r}0`, `$acc${r}1`]);
  // Rows in chunks of CHUNK points, so that the chunk of a and dy stays in cache while every
  // block of dW passes over it; dW (zeroed by the caller) carries the sums between chunks.
  return `(func (export "weight_gradient") (param $n i32) (param $in i32) (param $out i32) (param $a i32) (param $dy i32) (param $dw i32)
  (local $i i32) (local $j i32) (local $p i32) (local $p0 i32) (local $p1 i32) (local $pa i32) (local $pd i32) (local $sa i32) (local $sd i32)
  (local $s v128) (local $d0 v128) (local $d1 v128) ${accs.map((a) => `(local ${a} v128)`).join(' ')}
  (local.set $sa (i32.shl (local.get $in) (i32.const 2)))
  (local.set $sd (i32.shl (local.get $out) (i32.const 2)))
  (local.set $p0 (i32.const 0))
  (loop $chunks
    (local.set $p1 (i32.add (local.get $p0) (i32.const ${CHUNK})))
    (if (i32.gt_u (local.get $p1) (local.get $n)) (then (local.set $p1 (local.get $n))))
    (local.set $i (i32.const 0))
    ${rowBlocks(ROWS, 'four')}
    ${rowBlocks(1, 'one')}
    (br_if $chunks (i32.lt_u (local.tee $p0 (local.get $p1)) (local.get $n)))))`;
}

/**
 * One output column (the network's last layer): dW[i] = Σ_p a[p, i]·dy[p], f32x4 over i,
 * one pass down the rows. Needs in a multiple of 4.
 */
const oneColumnWat = `(func (export "weight_gradient_one_column") (param $n i32) (param $in i32) (param $a i32) (param $dy i32) (param $dw i32)
  (local $p i32) (local $i i32) (local $pa i32) (local $rowEnd i32) (local $s v128)
  (local.set $rowEnd (i32.shl (local.get $in) (i32.const 2)))
  (local.set $pa (local.get $a))
  (loop $points
    (local.set $s (f32x4.splat (f32.load (i32.add (local.get $dy) (i32.shl (local.get $p) (i32.const 2))))))
    (local.set $i (i32.const 0))
    (loop $cols
      (v128.store (i32.add (local.get $dw) (local.get $i))
        (f32x4.add (v128.load (i32.add (local.get $dw) (local.get $i))) (f32x4.mul (v128.load (i32.add (local.get $pa) (local.get $i))) (local.get $s))))
      (br_if $cols (i32.lt_u (local.tee $i (i32.add (local.get $i) (i32.const 16))) (local.get $rowEnd))))
    (local.set $pa (i32.add (local.get $pa) (local.get $rowEnd)))
    (br_if $points (i32.lt_u (local.tee $p (i32.add (local.get $p) (i32.const 1))) (local.get $n)))))`;

export const weightGradientWatText = `${weightGradientWat()}\n${oneColumnWat}`;

/** Register the kernel on the WASM backend (once, from wasm/kernels.ts). */
export function registerWeightGradientKernel(tf: Tf, backend: WasmBackend, heap: HeapExports): void {
  const offset = (t: TensorInfo) => heapOffset(backend, t);
  registerHeapKernel(tf, KERNEL, (inputs) => {
    const [a, dy] = [inputs.a as TensorInfo, inputs.dy as TensorInfo];
    const [n, inW] = a.shape;
    const outW = dy.shape[1];
    const dw = backend.makeOutput([inW, outW], 'float32');
    heapView(backend, dw).fill(0);
    if (outW === 1) heap.weight_gradient_one_column(n, inW, offset(a), offset(dy), offset(dw));
    else heap.weight_gradient(n, inW, outW, offset(a), offset(dy), offset(dw));
    return dw;
  });
}

/** aᵀ·dy by the kernel, or null where it does not apply (shapes above). Used inside gradient functions only; call through wasm/kernels.ts. */
export function runWeightGradient(tf: Tf, a: TfModule.Tensor, dy: TfModule.Tensor): TfModule.Tensor | null {
  if (a.rank !== 2 || dy.rank !== 2 || a.dtype !== 'float32' || dy.dtype !== 'float32') return null;
  const [n, inW] = a.shape as [number, number];
  const outW = dy.shape[1]!;
  const fits = outW === 1 ? inW % 4 === 0 : outW % 8 === 0;
  if (n < 1 || dy.shape[0] !== n || !fits) return null;
  return tf.engine().runKernel(KERNEL, { a, dy }) as TfModule.Tensor;
}

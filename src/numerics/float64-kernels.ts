/**
 * Float64 kernels in SIMD WebAssembly (f64x2) for the two products that dominate a
 * Levenberg–Marquardt iteration of the second-order phase: the lower triangle of JᵀJ over a
 * chunk of rows (numerics/grouped-normal-equations.ts) and the off-diagonal part of a block
 * of four rows of a Cholesky factor (numerics/cholesky.ts).
 *
 * Both keep the plain-JS code's order of additions for every entry (each lane of a vector is
 * one entry of the result, never a partial sum of one entry), and WebAssembly's f64 mul and
 * add round like JS's (no fused multiply-add in this SIMD set), so the results are the same
 * to the last bit as the JS forms they replace; tests/numerics/float64-kernels.test.ts checks
 * both against plain triple loops. Why WebAssembly: V8 runs the JS forms one double at a time
 * with bounds checks; two lanes per instruction and no checks made them three to four times as
 * fast on the recipe's shapes (measured: docs/second-order-training.md, "The iteration in f64x2
 * kernels").
 *
 * The module has a memory of its own; callers copy their arrays in through `scratch` (a bump
 * allocation reset by `reset`) and read the results through views. It is loaded once,
 * asynchronously (the text assembler, wabt, starts asynchronously): `loadFloat64Kernels()`;
 * until then `float64Kernels()` is null and the callers run their JS forms. One instance per
 * thread (module state), used by one synchronous call at a time.
 *
 * Methods: the row-oriented product JᵀJ as a sum of rank-one row terms, register-blocked
 * 2 × 8 (Golub & Van Loan, "Matrix Computations", 4th ed., §1.5); Cholesky in its
 * dot-product form (ibid., Algorithm 4.2.1), four rows at a time against two earlier rows.
 * Units: none (plain numbers).
 */

import { assembleSimdModule } from './simd-module.js';

/** Byte offsets into the module's memory, as the kernels take them. */
type Offset = number;

interface Exports {
  memory: WebAssembly.Memory;
  /**
   * G[a·ldg + b] += Σ_{i<rows} X[i·ldx + a]·Y[i·ldy + b], each entry summed over i in order from
   * 0 and then added: a < ka in pairs, b in blocks of 8, b < kb or (lower ≠ 0) b < a + 2. So X
   * needs ka rounded up to even columns, Y its b range rounded up to 8 (padding zeros), and G
   * room for both; entries beyond the asked ones are written with finite values and ignored.
   */
  product_tn(X: Offset, ldx: number, Y: Offset, ldy: number, rows: number, G: Offset, ldg: number, ka: number, kb: number, lower: number): void;
  /** Rows i0 … i0+3 of L against the earlier rows 0 … i0−1 (pairs of them), the panel P[k·4 + c] = L[i0 + c, k] kept beside. */
  chol_rows4(A: Offset, L: Offset, P: Offset, n: number, i0: number): void;
}

const productWat = (() => {
  const acc = (r: number, h: number) => `$s${r}${h}`;
  const accs = [0, 1].flatMap((r) => [0, 1, 2, 3].map((h) => acc(r, h)));
  const update = [0, 1].flatMap((r) => [0, 1, 2, 3].map((h) => `(local.set ${acc(r, h)} (f64x2.add (local.get ${acc(r, h)}) (f64x2.mul (local.get $x${r}) (local.get $z${h}))))`)).join('\n          ');
  const store = [0, 1]
    .flatMap((r) =>
      [0, 1, 2, 3].map(
        (h) => `(v128.store offset=${16 * h} (local.get $g${r}) (f64x2.add (v128.load offset=${16 * h} (local.get $g${r})) (local.get ${acc(r, h)})))`,
      ),
    )
    .join('\n        ');
  return `(func (export "product_tn") (param $X i32) (param $ldx i32) (param $Y i32) (param $ldy i32) (param $rows i32) (param $G i32) (param $ldg i32) (param $ka i32) (param $kb i32) (param $lower i32)
  (local $a i32) (local $b i32) (local $bEnd i32) (local $i i32) (local $sx i32) (local $sy i32) (local $pa i32) (local $pb i32) (local $g0 i32) (local $g1 i32)
  (local $x0 v128) (local $x1 v128) (local $z0 v128) (local $z1 v128) (local $z2 v128) (local $z3 v128)
  ${accs.map((a) => `(local ${a} v128)`).join(' ')}
  (local.set $sx (i32.shl (local.get $ldx) (i32.const 3)))
  (local.set $sy (i32.shl (local.get $ldy) (i32.const 3)))
  (local.set $a (i32.const 0))
  (block $a_done (loop $a_loop
    (br_if $a_done (i32.ge_u (local.get $a) (local.get $ka)))
    (local.set $bEnd (select (i32.add (local.get $a) (i32.const 2)) (local.get $kb) (local.get $lower)))
    (local.set $b (i32.const 0))
    (block $b_done (loop $b_loop
      (br_if $b_done (i32.ge_u (local.get $b) (local.get $bEnd)))
      ${accs.map((a) => `(local.set ${a} (v128.const i64x2 0 0))`).join(' ')}
      (local.set $pa (i32.add (local.get $X) (i32.shl (local.get $a) (i32.const 3))))
      (local.set $pb (i32.add (local.get $Y) (i32.shl (local.get $b) (i32.const 3))))
      (local.set $i (i32.const 0))
      (block $i_done (loop $i_loop
        (br_if $i_done (i32.ge_u (local.get $i) (local.get $rows)))
          (local.set $x0 (v128.load64_splat (local.get $pa)))
          (local.set $x1 (v128.load64_splat offset=8 (local.get $pa)))
          (local.set $z0 (v128.load (local.get $pb)))
          (local.set $z1 (v128.load offset=16 (local.get $pb)))
          (local.set $z2 (v128.load offset=32 (local.get $pb)))
          (local.set $z3 (v128.load offset=48 (local.get $pb)))
          ${update}
        (local.set $pa (i32.add (local.get $pa) (local.get $sx)))
        (local.set $pb (i32.add (local.get $pb) (local.get $sy)))
        (local.set $i (i32.add (local.get $i) (i32.const 1)))
        (br $i_loop)))
      (local.set $g0 (i32.add (local.get $G) (i32.shl (i32.add (i32.mul (local.get $a) (local.get $ldg)) (local.get $b)) (i32.const 3))))
      (local.set $g1 (i32.add (local.get $g0) (i32.shl (local.get $ldg) (i32.const 3))))
        ${store}
      (local.set $b (i32.add (local.get $b) (i32.const 8)))
      (br $b_loop)))
    (local.set $a (i32.add (local.get $a) (i32.const 2)))
    (br $a_loop))))`;
})();

/**
 * Rows r0..r3 = i0..i0+3 against earlier rows j, j+1 (j < i0, i0 a multiple of 4):
 *   s_c = A[r_c, j] − Σ_{k<j} L[r_c, k] L[j, k],  L[r_c, j] = s_c / L[j, j],
 *   t_c = A[r_c, j+1] − Σ_{k<j} L[r_c, k] L[j+1, k],  L[r_c, j+1] = (t_c − L[r_c, j] L[j+1, j]) / L[j+1, j+1],
 * lanes (r0, r1) and (r2, r3), L[r_c, k] read from the panel P (k-major, four per k).
 */
const cholWat = `(func (export "chol_rows4") (param $A i32) (param $L i32) (param $P i32) (param $n i32) (param $i0 i32)
  (local $j i32) (local $k i32) (local $rowBytes i32) (local $r0 i32) (local $pj i32) (local $pk i32) (local $pp i32)
  (local $s01 v128) (local $s23 v128) (local $t01 v128) (local $t23 v128) (local $p01 v128) (local $p23 v128) (local $l v128) (local $m v128)
  (local $d v128) (local $e v128) (local $lkj v128) (local $aj i32) (local $lj i32)
  (local.set $rowBytes (i32.shl (local.get $n) (i32.const 3)))
  (local.set $r0 (i32.mul (local.get $i0) (local.get $rowBytes)))
  (local.set $j (i32.const 0))
  (block $j_done (loop $j_loop
    (br_if $j_done (i32.ge_u (i32.add (local.get $j) (i32.const 1)) (local.get $i0)))
    ;; A[r_c, j] and A[r_c, j+1]: four rows, two columns.
    (local.set $aj (i32.add (i32.add (local.get $A) (local.get $r0)) (i32.shl (local.get $j) (i32.const 3))))
    (local.set $s01 (v128.load64_lane 1 (i32.add (local.get $aj) (local.get $rowBytes)) (v128.load64_zero (local.get $aj))))
    (local.set $s23 (v128.load64_lane 1 (i32.add (local.get $aj) (i32.mul (local.get $rowBytes) (i32.const 3))) (v128.load64_zero (i32.add (local.get $aj) (i32.shl (local.get $rowBytes) (i32.const 1))))))
    (local.set $t01 (v128.load64_lane offset=8 1 (i32.add (local.get $aj) (local.get $rowBytes)) (v128.load64_zero offset=8 (local.get $aj))))
    (local.set $t23 (v128.load64_lane offset=8 1 (i32.add (local.get $aj) (i32.mul (local.get $rowBytes) (i32.const 3))) (v128.load64_zero offset=8 (i32.add (local.get $aj) (i32.shl (local.get $rowBytes) (i32.const 1))))))
    (local.set $pj (i32.add (local.get $L) (i32.mul (local.get $j) (local.get $rowBytes))))
    (local.set $pk (local.get $pj))
    (local.set $pp (local.get $P))
    (local.set $k (i32.const 0))
    (block $k_done (loop $k_loop
      (br_if $k_done (i32.ge_u (local.get $k) (local.get $j)))
      (local.set $l (v128.load64_splat (local.get $pk)))
      (local.set $m (v128.load64_splat (i32.add (local.get $pk) (local.get $rowBytes))))
      (local.set $p01 (v128.load (local.get $pp)))
      (local.set $p23 (v128.load offset=16 (local.get $pp)))
      (local.set $s01 (f64x2.sub (local.get $s01) (f64x2.mul (local.get $p01) (local.get $l))))
      (local.set $s23 (f64x2.sub (local.get $s23) (f64x2.mul (local.get $p23) (local.get $l))))
      (local.set $t01 (f64x2.sub (local.get $t01) (f64x2.mul (local.get $p01) (local.get $m))))
      (local.set $t23 (f64x2.sub (local.get $t23) (f64x2.mul (local.get $p23) (local.get $m))))
      (local.set $pk (i32.add (local.get $pk) (i32.const 8)))
      (local.set $pp (i32.add (local.get $pp) (i32.const 32)))
      (local.set $k (i32.add (local.get $k) (i32.const 1)))
      (br $k_loop)))
    ;; L[j, j], L[j+1, j], L[j+1, j+1].
    (local.set $lj (i32.add (local.get $pj) (i32.shl (local.get $j) (i32.const 3))))
    (local.set $d (v128.load64_splat (local.get $lj)))
    (local.set $lkj (v128.load64_splat (i32.add (local.get $lj) (local.get $rowBytes))))
    (local.set $e (v128.load64_splat offset=8 (i32.add (local.get $lj) (local.get $rowBytes))))
    (local.set $s01 (f64x2.div (local.get $s01) (local.get $d)))
    (local.set $s23 (f64x2.div (local.get $s23) (local.get $d)))
    (local.set $t01 (f64x2.div (f64x2.sub (local.get $t01) (f64x2.mul (local.get $s01) (local.get $lkj))) (local.get $e)))
    (local.set $t23 (f64x2.div (f64x2.sub (local.get $t23) (f64x2.mul (local.get $s23) (local.get $lkj))) (local.get $e)))
    ;; The panel: P[j·4 + c] = L[r_c, j], P[(j+1)·4 + c] = L[r_c, j+1].
    (v128.store (local.get $pp) (local.get $s01))
    (v128.store offset=16 (local.get $pp) (local.get $s23))
    (v128.store offset=32 (local.get $pp) (local.get $t01))
    (v128.store offset=48 (local.get $pp) (local.get $t23))
    ;; L itself (row-major): L[r_c, j], L[r_c, j+1].
    (local.set $aj (i32.add (i32.add (local.get $L) (local.get $r0)) (i32.shl (local.get $j) (i32.const 3))))
    (v128.store64_lane 0 (local.get $aj) (local.get $s01))
    (v128.store64_lane offset=8 0 (local.get $aj) (local.get $t01))
    (v128.store64_lane 1 (i32.add (local.get $aj) (local.get $rowBytes)) (local.get $s01))
    (v128.store64_lane offset=8 1 (i32.add (local.get $aj) (local.get $rowBytes)) (local.get $t01))
    (v128.store64_lane 0 (i32.add (local.get $aj) (i32.shl (local.get $rowBytes) (i32.const 1))) (local.get $s23))
    (v128.store64_lane offset=8 0 (i32.add (local.get $aj) (i32.shl (local.get $rowBytes) (i32.const 1))) (local.get $t23))
    (v128.store64_lane 1 (i32.add (local.get $aj) (i32.mul (local.get $rowBytes) (i32.const 3))) (local.get $s23))
    (v128.store64_lane offset=8 1 (i32.add (local.get $aj) (i32.mul (local.get $rowBytes) (i32.const 3))) (local.get $t23))
    (local.set $j (i32.add (local.get $j) (i32.const 2)))
    (br $j_loop))))`;

const moduleWat = `(module
(memory (export "memory") 1)
${productWat}
${cholWat})`;

export class Float64Kernels {
  private top = 0;

  constructor(private readonly exports: Exports) {}

  /** Forget every scratch array handed out (their contents stay until overwritten). */
  reset(): void {
    this.top = 0;
  }

  /** A zeroed array of `length` doubles in the module's memory (16-byte aligned), valid until `reset` or the next `scratch` that grows memory (take views again after). */
  scratch(length: number): { offset: Offset; length: number } {
    const offset = this.top;
    const bytes = Math.ceil((length * 8) / 16) * 16;
    const need = offset + bytes;
    const mem = this.exports.memory;
    // (The lib typings here lack Memory.grow.)
    if (need > mem.buffer.byteLength) (mem as unknown as { grow(pages: number): number }).grow(Math.ceil((need - mem.buffer.byteLength) / 65536));
    this.top = need;
    new Float64Array(mem.buffer, offset, length).fill(0);
    return { offset, length };
  }

  /** A Float64Array view of a scratch array (take it after the last `scratch` call). */
  view(s: { offset: Offset; length: number }): Float64Array {
    return new Float64Array(this.exports.memory.buffer, s.offset, s.length);
  }

  /** G += lower triangle of JᵀJ over `rows` rows of J (row stride kp, a multiple of 8; G kp × kp). */
  syrkLower(J: Offset, kp: number, rows: number, G: Offset): void {
    this.exports.product_tn(J, kp, J, kp, rows, G, kp, kp, kp, 1);
  }

  /** G += Xᵀ Y over `rows` rows (see Exports.product_tn): the lower triangle only when `lower`. */
  productTn(X: Offset, ldx: number, Y: Offset, ldy: number, rows: number, G: Offset, ldg: number, ka: number, kb: number, lower: boolean): void {
    this.exports.product_tn(X, ldx, Y, ldy, rows, G, ldg, ka, kb, lower ? 1 : 0);
  }

  cholRows4(A: Offset, L: Offset, P: Offset, n: number, i0: number): void {
    this.exports.chol_rows4(A, L, P, n, i0);
  }
}

let loaded: Float64Kernels | null = null;
let loading: Promise<Float64Kernels | null> | null = null;

/** The kernels once loaded (loadFloat64Kernels), else null: callers then run their JS forms. */
export function float64Kernels(): Float64Kernels | null {
  return loaded;
}

/**
 * Assemble and instantiate the module (once per thread). Resolves to null, and the callers
 * keep their JS forms, when this Node has no WebAssembly SIMD or the assembler is missing.
 */
export function loadFloat64Kernels(): Promise<Float64Kernels | null> {
  if (loading) return loading;
  loading = (async () => {
    const module = await assembleSimdModule('mesofield-float64.wat', moduleWat);
    loaded = module ? new Float64Kernels(new WebAssembly.Instance(module, {}).exports as unknown as Exports) : null;
    return loaded;
  })();
  return loading;
}

/** Drop the loaded kernels (tests compare the JS forms with the kernels in one process). */
export function setFloat64Kernels(k: Float64Kernels | null): void {
  loaded = k;
}

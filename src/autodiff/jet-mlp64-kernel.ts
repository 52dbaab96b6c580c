/**
 * The passes of JetMlp64 (jet-mlp64.ts) for tanh networks in SIMD WebAssembly (f64x2): the
 * dense layers of the forward jet, the activation's forward rules and each layer's reverse
 * sweep. They are the per-point cost of every Jacobian row of the second-order phase and of
 * the least-squares network estimator (about a third of an LM iteration's CPU in JS, measured
 * in docs/second-order-training.md, "Jet passes in f64x2 kernels").
 *
 * Same results to the last bit as the JS passes: each lane of a vector is one entry of the
 * result (an output unit o of a layer), the additions into every entry come in the JS order
 * (bias, then inputs i = 0, 1, … ; channels c = 0 … 3 within an i), the sums over o that give
 * an input's adjoint stay sequential and scalar, every expression is evaluated with the JS
 * code's grouping, WebAssembly's f64 mul and add round like JS's (no fused multiply-add), and
 * tanh is JS's own Math.tanh, taken in JS between the dense layer and its rules (WebAssembly
 * has no tanh). The sin activation keeps the
 * JS passes. tests/autodiff/jet-mlp64-kernel.test.ts compares both forms bit for bit.
 *
 * Each network gets an instance with a memory of its own (a few kB): its parameters, a
 * gradient slice and the per-layer jets, laid out as in JetMlp64. The module is assembled
 * once per thread, asynchronously (wabt starts asynchronously): `loadJetKernels()`; until
 * then, or without WebAssembly SIMD, JetMlp64 runs its JS passes.
 * Units: none (plain numbers).
 */
import { assembleSimdModule } from '../numerics/simd-module.js';

const loop = (name: string, counter: string, end: string, step: number, body: string) => `(local.set $${counter} (i32.const 0))
    (block $${name}_done (loop $${name}
      (br_if $${name}_done (i32.ge_u (local.get $${counter}) ${end}))
      ${body}
      (local.set $${counter} (i32.add (local.get $${counter}) (i32.const ${step})))
      (br $${name})))`;
const at = (base: string, off: string) => `(i32.add (local.get $${base}) ${off})`;
const o = '(local.get $o)';

/**
 * dense(A, nin, K, B, nout, Z, nc): Z[c·nout + o] = [c = 0] B[o] + Σ_i A[c·nin + i] K[i·nout + o]
 * for c < nc, the sum over i in order and products with A = 0 skipped (as the JS pass).
 */
const denseWat = `(func (export "dense") (param $A i32) (param $nin i32) (param $K i32) (param $B i32) (param $nout i32) (param $Z i32) (param $nc i32)
  (local $o i32) (local $i i32) (local $c i32) (local $ai f64) (local $av v128) (local $zc i32) (local $kr i32) (local $ob i32) (local $n2 i32) (local $end i32)
  (local.set $ob (i32.shl (local.get $nout) (i32.const 3)))
  (local.set $n2 (i32.shl (i32.and (local.get $nout) (i32.const -2)) (i32.const 3)))
  (local.set $end (i32.mul (local.get $nc) (local.get $ob)))
  ${loop('zero', 'o', '(local.get $end)', 8, `(f64.store ${at('Z', o)} (f64.const 0))`)}
  ${loop('bias', 'o', '(local.get $ob)', 8, `(f64.store ${at('Z', o)} (f64.load ${at('B', o)}))`)}
  ${loop(
    'rows',
    'i',
    '(local.get $nin)',
    1,
    `(local.set $kr (i32.add (local.get $K) (i32.mul (local.get $i) (local.get $ob))))
      ${loop(
        'chan',
        'c',
        '(local.get $nc)',
        1,
        `(local.set $ai (f64.load (i32.add (local.get $A) (i32.shl (i32.add (i32.mul (local.get $c) (local.get $nin)) (local.get $i)) (i32.const 3)))))
        (if (f64.ne (local.get $ai) (f64.const 0)) (then
          (local.set $av (f64x2.splat (local.get $ai)))
          (local.set $zc (i32.add (local.get $Z) (i32.mul (local.get $c) (local.get $ob))))
          ${loop('pairs', 'o', '(local.get $n2)', 16, `(v128.store ${at('zc', o)} (f64x2.add (v128.load ${at('zc', o)}) (f64x2.mul (local.get $av) (v128.load ${at('kr', o)}))))`)}
          (if (i32.lt_u (local.get $n2) (local.get $ob)) (then
            (f64.store ${at('zc', '(local.get $n2)')} (f64.add (f64.load ${at('zc', '(local.get $n2)')}) (f64.mul (local.get $ai) (f64.load ${at('kr', '(local.get $n2)')}))))))))`,
      )}`,
  )})`;

/**
 * activate(Z, T, Y, nout, full): with y = tanh(z) already in Y's value channel (JS's Math.tanh,
 * written by the caller: WebAssembly has none, and an imported call per unit cost more than
 * the JS loop), T gets t1, t2, t3 and, with the full jet, Y the channel rules
 * y_x = t1 z_x, y_xx = t2 z_x² + t1 z_xx, y_s = t1 z_s (jet-mlp64.ts).
 */
const activateWat = `(func (export "activate") (param $Z i32) (param $T i32) (param $Y i32) (param $nout i32) (param $full i32)
  (local $o i32) (local $ob i32) (local $t0 f64) (local $t1 f64) (local $t2 f64) (local $zx f64) (local $p i32) (local $z i32)
  (local.set $ob (i32.shl (local.get $nout) (i32.const 3)))
  ${loop(
    'units',
    'o',
    '(local.get $ob)',
    8,
    `(local.set $z ${at('Z', o)})
      (local.set $p ${at('Y', o)})
      (local.set $t0 (f64.load (local.get $p)))
      (local.set $t1 (f64.sub (f64.const 1) (f64.mul (local.get $t0) (local.get $t0))))
      (local.set $t2 (f64.mul (f64.mul (f64.const -2) (local.get $t0)) (local.get $t1)))
      (local.set $p ${at('T', o)})
      (f64.store (local.get $p) (local.get $t1))
      (f64.store ${at('p', '(local.get $ob)')} (local.get $t2))
      (f64.store ${at('p', '(i32.shl (local.get $ob) (i32.const 1))')} (f64.mul (f64.const -2) (f64.add (f64.mul (local.get $t1) (local.get $t1)) (f64.mul (local.get $t0) (local.get $t2)))))
      (local.set $p ${at('Y', o)})
      (if (local.get $full) (then
        (local.set $zx (f64.load ${at('z', '(local.get $ob)')}))
        (f64.store ${at('p', '(local.get $ob)')} (f64.mul (local.get $t1) (local.get $zx)))
        (f64.store ${at('p', '(i32.shl (local.get $ob) (i32.const 1))')} (f64.add (f64.mul (f64.mul (local.get $t2) (local.get $zx)) (local.get $zx)) (f64.mul (local.get $t1) (f64.load ${at('z', '(i32.shl (local.get $ob) (i32.const 1))')}))))
        (f64.store ${at('p', '(i32.mul (local.get $ob) (i32.const 3))')} (f64.mul (local.get $t1) (f64.load ${at('z', '(i32.mul (local.get $ob) (i32.const 3))')})))))`,
  )})`;

/**
 * reverse(T, Zz, Ybar, Zbar, A, nin, nout, K, GK, GB, Abar, isOut, needInput): one layer of
 * the reverse sweep. z̄ from ȳ (identity on the output layer, the activation's reverse rule
 * on a hidden one), GB += z̄_v, GK[i·nout + o] += Σ_c A[c·nin + i] z̄[c·nout + o] (c in order,
 * A = 0 skipped) and, when needInput, Abar[c·nin + i] = Σ_o K[i·nout + o] z̄[c·nout + o] (o in
 * order, scalar).
 */
const reverseWat = `(func (export "reverse") (param $T i32) (param $Zz i32) (param $Ybar i32) (param $Zbar i32) (param $A i32) (param $nin i32) (param $nout i32) (param $K i32) (param $GK i32) (param $GB i32) (param $Abar i32) (param $isOut i32) (param $needInput i32)
  (local $o i32) (local $ob i32) (local $ob2 i32) (local $ob3 i32) (local $end i32) (local $n2 i32)
  (local $t1 f64) (local $t2 f64) (local $t3 f64) (local $zx f64) (local $zxx f64) (local $zs f64) (local $bv f64) (local $bx f64) (local $bxx f64) (local $bs f64)
  (local $i i32) (local $c i32) (local $ai f64) (local $av v128) (local $zc i32) (local $kr i32) (local $gr i32) (local $back f64) (local $p i32)
  (local.set $ob (i32.shl (local.get $nout) (i32.const 3)))
  (local.set $ob2 (i32.shl (local.get $ob) (i32.const 1)))
  (local.set $ob3 (i32.mul (local.get $ob) (i32.const 3)))
  (local.set $n2 (i32.shl (i32.and (local.get $nout) (i32.const -2)) (i32.const 3)))
  (if (local.get $isOut)
    (then
      (local.set $end (i32.shl (local.get $ob) (i32.const 2)))
      ${loop('copy', 'o', '(local.get $end)', 8, `(f64.store ${at('Zbar', o)} (f64.load ${at('Ybar', o)}))`)})
    (else
      ${loop(
        'rule',
        'o',
        '(local.get $ob)',
        8,
        `(local.set $p ${at('T', o)})
        (local.set $t1 (f64.load (local.get $p)))
        (local.set $t2 (f64.load ${at('p', '(local.get $ob)')}))
        (local.set $t3 (f64.load ${at('p', '(local.get $ob2)')}))
        (local.set $p ${at('Zz', o)})
        (local.set $zx (f64.load ${at('p', '(local.get $ob)')}))
        (local.set $zxx (f64.load ${at('p', '(local.get $ob2)')}))
        (local.set $zs (f64.load ${at('p', '(local.get $ob3)')}))
        (local.set $p ${at('Ybar', o)})
        (local.set $bv (f64.load (local.get $p)))
        (local.set $bx (f64.load ${at('p', '(local.get $ob)')}))
        (local.set $bxx (f64.load ${at('p', '(local.get $ob2)')}))
        (local.set $bs (f64.load ${at('p', '(local.get $ob3)')}))
        (local.set $p ${at('Zbar', o)})
        (f64.store (local.get $p)
          (f64.add
            (f64.add
              (f64.add (f64.mul (local.get $bv) (local.get $t1)) (f64.mul (f64.mul (local.get $bx) (local.get $t2)) (local.get $zx)))
              (f64.mul (local.get $bxx) (f64.add (f64.mul (f64.mul (local.get $t3) (local.get $zx)) (local.get $zx)) (f64.mul (local.get $t2) (local.get $zxx)))))
            (f64.mul (f64.mul (local.get $bs) (local.get $t2)) (local.get $zs))))
        (f64.store ${at('p', '(local.get $ob)')} (f64.add (f64.mul (local.get $bx) (local.get $t1)) (f64.mul (f64.mul (f64.mul (f64.const 2) (local.get $bxx)) (local.get $t2)) (local.get $zx))))
        (f64.store ${at('p', '(local.get $ob2)')} (f64.mul (local.get $bxx) (local.get $t1)))
        (f64.store ${at('p', '(local.get $ob3)')} (f64.mul (local.get $bs) (local.get $t1)))`,
      )}))
  ${loop('bias', 'o', '(local.get $ob)', 8, `(f64.store ${at('GB', o)} (f64.add (f64.load ${at('GB', o)}) (f64.load ${at('Zbar', o)})))`)}
  ${loop(
    'rows',
    'i',
    '(local.get $nin)',
    1,
    `(local.set $kr (i32.add (local.get $K) (i32.mul (local.get $i) (local.get $ob))))
      (local.set $gr (i32.add (local.get $GK) (i32.mul (local.get $i) (local.get $ob))))
      ${loop(
        'chan',
        'c',
        '(i32.const 4)',
        1,
        `(local.set $p (i32.shl (i32.add (i32.mul (local.get $c) (local.get $nin)) (local.get $i)) (i32.const 3)))
        (local.set $ai (f64.load ${at('A', '(local.get $p)')}))
        (local.set $zc (i32.add (local.get $Zbar) (i32.mul (local.get $c) (local.get $ob))))
        (if (f64.ne (local.get $ai) (f64.const 0)) (then
          (local.set $av (f64x2.splat (local.get $ai)))
          ${loop('pairs', 'o', '(local.get $n2)', 16, `(v128.store ${at('gr', o)} (f64x2.add (v128.load ${at('gr', o)}) (f64x2.mul (local.get $av) (v128.load ${at('zc', o)}))))`)}
          (if (i32.lt_u (local.get $n2) (local.get $ob)) (then
            (f64.store ${at('gr', '(local.get $n2)')} (f64.add (f64.load ${at('gr', '(local.get $n2)')}) (f64.mul (local.get $ai) (f64.load ${at('zc', '(local.get $n2)')}))))))))
        (if (local.get $needInput) (then
          (local.set $back (f64.const 0))
          ${loop('dot', 'o', '(local.get $ob)', 8, `(local.set $back (f64.add (local.get $back) (f64.mul (f64.load ${at('kr', o)}) (f64.load ${at('zc', o)}))))`)}
          (f64.store ${at('Abar', '(local.get $p)')} (local.get $back))))`,
      )}`,
  )})`;

const moduleWat = `(module
(import "env" "memory" (memory 1))
${denseWat}
${activateWat}
${reverseWat})`;

export interface JetKernelExports {
  dense(A: number, nin: number, K: number, B: number, nout: number, Z: number, nc: number): void;
  activate(Z: number, T: number, Y: number, nout: number, full: number): void;
  reverse(T: number, Zz: number, Ybar: number, Zbar: number, A: number, nin: number, nout: number, K: number, GK: number, GB: number, Abar: number, isOut: number, needInput: number): void;
}

/** One network's instance: its exports and its memory as doubles. */
export interface JetKernelInstance {
  exports: JetKernelExports;
  memory: Float64Array;
}

let compiled: WebAssembly.Module | null = null;
let loading: Promise<WebAssembly.Module | null> | null = null;

/** The assembled module once loaded (loadJetKernels), else null: JetMlp64 then runs its JS passes. */
export function jetKernelModule(): WebAssembly.Module | null {
  return compiled;
}

/** Assemble the module (once per thread); null when this Node has no WebAssembly SIMD or no assembler. */
export function loadJetKernels(): Promise<WebAssembly.Module | null> {
  if (loading) return loading;
  loading = (async () => {
    compiled = await assembleSimdModule('mesofield-jet64.wat', moduleWat);
    return compiled;
  })();
  return loading;
}

/** Use (or, with null, stop using) the module for networks made from now on (tests compare both forms). */
export function setJetKernelModule(m: WebAssembly.Module | null): void {
  compiled = m;
}

/** An instance with a memory of `doubles` doubles of its own. */
export function instantiateJetKernel(module: WebAssembly.Module, doubles: number): JetKernelInstance {
  // (The lib typings here give WebAssembly.Memory no descriptor argument.)
  const Memory = WebAssembly.Memory as unknown as new (d: { initial: number }) => WebAssembly.Memory;
  const memory = new Memory({ initial: Math.max(1, Math.ceil((doubles * 8) / 65536)) });
  const instance = new WebAssembly.Instance(module, { env: { memory } });
  return { exports: instance.exports as unknown as JetKernelExports, memory: new Float64Array(memory.buffer, 0, doubles) };
}

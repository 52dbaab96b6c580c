/**
 * One Adam update of one parameter tensor in one WASM kernel (issue 7): the same arithmetic,
 * in the same order and in float32, as the tfjs ops of src/autodiff/adam.ts (Kingma & Ba,
 * ICLR 2015, Alg. 1):
 *   m' = β₁·m + (1 − β₁)·g
 *   v' = β₂·v + (1 − β₂)·g²
 *   θ' = θ − (m'·(α/c₁)) / (√(v'/c₂) + ε),   c₁ = 1 − β₁ᵗ, c₂ = 1 − β₂ᵗ
 * where tfjs spends about eleven kernels per parameter tensor, each with the engine's
 * per-call cost, which dominates for the many small tensors of a network. f32x4 over the
 * elements, then one at a time for the last size mod 4.
 */
import type * as TfModule from '@tensorflow/tfjs';
import type { Tf } from '../tf.js';
import { heapOffset, registerHeapKernel } from './heap-module.js';
import type { HeapExports, WasmBackend } from './heap-module.js';

type TensorInfo = TfModule.TensorInfo;

const KERNEL = 'MesofieldAdamUpdate';

/** The loop body for one lane width: vector (f32x4, 16 bytes) or scalar (f32, 4 bytes). */
function adamLoop(vector: boolean, label: string): string {
  const f = vector ? 'f32x4' : 'f32';
  const ld = (p: string) => `(${vector ? 'v128' : 'f32'}.load (i32.add (local.get $${p}) (local.get $o)))`;
  const st = (p: string, v: string) => `(${vector ? 'v128' : 'f32'}.store (i32.add (local.get $${p}) (local.get $o)) ${v})`;
  const c = (name: string) => (vector ? `(f32x4.splat (local.get $${name}))` : `(local.get $${name})`);
  const step = vector ? 16 : 4;
  const limit = vector ? '$vend' : '$end';
  const m = `(${f}.add (${f}.mul ${ld('m')} ${c('b1')}) (${f}.mul ${ld('g')} ${c('ob1')}))`;
  const v = `(${f}.add (${f}.mul ${ld('v')} ${c('b2')}) (${f}.mul (${f}.mul ${ld('g')} ${ld('g')}) ${c('ob2')}))`;
  const mNew = vector ? '$vm' : '$sm';
  const vNew = vector ? '$vv' : '$sv';
  const update = `(${f}.div (${f}.mul (local.get ${mNew}) ${c('lrc1')}) (${f}.add (${f}.sqrt (${f}.div (local.get ${vNew}) ${c('c2')})) ${c('eps')}))`;
  return `(block $${label}_done (loop $${label}
    (br_if $${label}_done (i32.ge_u (local.get $o) (local.get ${limit})))
    (local.set ${mNew} ${m})
    (local.set ${vNew} ${v})
    ${st('mo', `(local.get ${mNew})`)}
    ${st('vo', `(local.get ${vNew})`)}
    ${st('po', `(${f}.sub ${ld('p')} ${update})`)}
    (local.set $o (i32.add (local.get $o) (i32.const ${step})))
    (br $${label})))`;
}

export const adamWat = `(func (export "adam_update") (param $size i32) (param $p i32) (param $g i32) (param $m i32) (param $v i32) (param $po i32) (param $mo i32) (param $vo i32)
  (param $b1 f32) (param $ob1 f32) (param $b2 f32) (param $ob2 f32) (param $lrc1 f32) (param $c2 f32) (param $eps f32)
  (local $o i32) (local $end i32) (local $vend i32) (local $vm v128) (local $vv v128) (local $sm f32) (local $sv f32)
  (local.set $end (i32.shl (local.get $size) (i32.const 2)))
  (local.set $vend (i32.shl (i32.and (local.get $size) (i32.const -4)) (i32.const 2)))
  ${adamLoop(true, 'lanes')}
  ${adamLoop(false, 'tail')})`;

/** Register the kernel on the WASM backend (once, from wasm/kernels.ts). */
export function registerAdamKernel(tf: Tf, backend: WasmBackend, heap: HeapExports): void {
  const offset = (t: TensorInfo) => heapOffset(backend, t);
  registerHeapKernel(tf, KERNEL, (inputs, attrs) => {
    const [p, g, m, v] = (['p', 'g', 'm', 'v'] as const).map((k) => inputs[k] as TensorInfo);
    const a = attrs as unknown as { beta1: number; beta2: number; epsilon: number; lrOverC1: number; c2: number };
    const size = p.shape.reduce((x, y) => x * y, 1);
    const outs = [p, m, v].map((t) => backend.makeOutput(t.shape, 'float32'));
    heap.adam_update(size, offset(p), offset(g), offset(m), offset(v), ...outs.map(offset), a.beta1, 1 - a.beta1, a.beta2, 1 - a.beta2, a.lrOverC1, a.c2, a.epsilon);
    return outs;
  });
}

export interface AdamStepSettings {
  beta1: number;
  beta2: number;
  epsilon: number;
  /** α / (1 − β₁ᵗ) */
  lrOverC1: number;
  /** 1 − β₂ᵗ */
  c2: number;
}

/**
 * [θ', m', v'] by the kernel, or null where it does not apply (not float32, sizes differ).
 * Absent moments (the first step) are zeros, which the update then turns into (1 − β)·g
 * and (1 − β)·g². Call through wasm/kernels.ts (which knows whether the kernel is installed).
 */
export function runAdamUpdate(tf: Tf, p: TfModule.Tensor, g: TfModule.Tensor, m: TfModule.Tensor | undefined, v: TfModule.Tensor | undefined, s: AdamStepSettings): TfModule.Tensor[] | null {
  if ([p, g, m, v].some((t) => t && (t.dtype !== 'float32' || t.size !== p.size))) return null;
  const inputs = { p, g, m: m ?? tf.zerosLike(g), v: v ?? tf.zerosLike(g) };
  return tf.engine().runKernel(KERNEL, inputs, s as unknown as TfModule.NamedAttrMap) as TfModule.Tensor[];
}

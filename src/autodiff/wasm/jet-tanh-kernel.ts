/**
 * tanh on a jet in one WASM kernel forward and one backward (issue 7).
 *
 * The rule is stated once, in Jet.tanh (src/autodiff/jet.ts): t = tanh z, t' = 1 − t²,
 * t'' = −2t·t', carried to the channels by the jet's chain rule. Channel by channel that
 * is about 14 tfjs kernels forward and twice that in tfjs's reverse mode, each a pass over
 * an [n, h] array on a fresh part of the heap; here it is one pass each way, in f32x4 SIMD
 * on the tensors in place. What the passes compute (the backward is the reverse mode of
 * the forward, with g_c = ∂L/∂out_c):
 *
 *   forward   t = 2σ(2z) − 1 (σ by the backend's own Sigmoid kernel, as fastTanh);
 *             d1 = t', d2 = t'' from the rule; out_x = d1·z_x,
 *             out_xx = d1·z_xx + d2·z_x², out_s = d1·z_s
 *   backward  G1 = g_x·z_x + g_xx·z_xx + g_s·z_s,   ∂L/∂t = g_v + G1·∂d1/∂t + g_xx·z_x²·∂d2/∂t,
 *             ∂L/∂z = ∂L/∂t·d1,  ∂L/∂z_x = g_x·d1 + 2·d2·z_x·g_xx,
 *             ∂L/∂z_xx = g_xx·d1,  ∂L/∂z_s = g_s·d1
 *
 * Tested against the rule, not generated from it: tests/autodiff/wasm-kernels.test.ts runs
 * Jet.tanh on plain tfjs ops (tfjs differentiates it) beside this kernel for every mix of
 * absent, per-point and one-row channels and compares values and gradients. Generating
 * the WAT would need a symbolic differentiator for the backward pass, several times the
 * size of the rule, and would change the float32 association of the kernel's arithmetic,
 * so that seeded training runs would no longer repeat bit for bit across that change; the
 * test pins the kernel to the rule just as well.
 *
 * A channel may be absent, or one row [1, h] broadcast over the n points (the first layer's
 * ∂x and ∂s when the input is x or s itself); the gradient of a row channel is summed over
 * the points. Each combination is its own kernel name, so tfjs saves exactly the tensors its
 * gradient reads.
 */
import type * as TfModule from '@tensorflow/tfjs';
import type { Tf } from '../tf.js';
import { add, get, heapOffset, heapView, load, mul, registerHeapKernel, rowLoopFunction, set, splat, store, sub } from './heap-module.js';
import type { HeapExports, WasmBackend } from './heap-module.js';

type Tensor = TfModule.Tensor;
type TensorInfo = TfModule.TensorInfo;

/** How a derivative channel enters: absent, per point [n, h], or one row [1, h]. */
type Form = 'none' | 'full' | 'row';
interface Variant {
  x: Form;
  xx: 'none' | 'full';
  s: Form;
}

const FORMS: Form[] = ['none', 'full', 'row'];
const VARIANTS: Variant[] = FORMS.flatMap((x) => (['none', 'full'] as const).flatMap((xx) => FORMS.map((s) => ({ x, xx, s })))).filter((v) => v.x !== 'none' || v.xx !== 'none' || v.s !== 'none');

const keyOf = (v: Variant) => `x${v.x}_xx${v.xx}_s${v.s}`;
const forwardName = (v: Variant) => `MesofieldJetTanh_${keyOf(v)}`;
const backwardName = (v: Variant) => `MesofieldJetTanhGrad_${keyOf(v)}`;

/** Input names of the forward kernel, in order (z first). */
function forwardInputs(v: Variant): string[] {
  return ['z', ...(v.x !== 'none' ? ['zx'] : []), ...(v.xx === 'full' ? ['zxx'] : []), ...(v.s !== 'none' ? ['zs'] : [])];
}
/** Outputs: t, then out_x (with z_x), out_xx (with z_x or z_xx), out_s (with z_s). */
function forwardOutputs(v: Variant): string[] {
  return ['t', ...(v.x !== 'none' ? ['ox'] : []), ...(v.x !== 'none' || v.xx === 'full' ? ['oxx'] : []), ...(v.s !== 'none' ? ['os'] : [])];
}
const gradientOf: Record<string, string> = { t: 'gv', ox: 'gx', oxx: 'gxx', os: 'gs' };

function forwardWat(v: Variant): string {
  const rx = v.x === 'row';
  const body = [set('vt', sub(mul(load('sg'), splat(2)), splat(1))), store('t', get('vt')), set('vd1', sub(splat(1), mul(get('vt'), get('vt'))))];
  if (v.x !== 'none') {
    body.push(set('vzx', load('zx', rx)), set('vd2', mul(mul(get('vt'), get('vd1')), splat(-2))), store('ox', mul(get('vd1'), get('vzx'))));
    const curvature = mul(mul(get('vd2'), get('vzx')), get('vzx'));
    body.push(store('oxx', v.xx === 'full' ? add(mul(get('vd1'), load('zxx')), curvature) : curvature));
  } else if (v.xx === 'full') {
    body.push(store('oxx', mul(get('vd1'), load('zxx'))));
  }
  if (v.s !== 'none') body.push(store('os', mul(get('vd1'), load('zs', v.s === 'row'))));
  const pointers = ['sg', ...forwardInputs(v).slice(1), ...forwardOutputs(v)];
  return rowLoopFunction(`fwd_${keyOf(v)}`, pointers, ['vt', 'vd1', 'vd2', 'vzx'], body);
}

function backwardWat(v: Variant): string {
  const [rx, rs] = [v.x === 'row', v.s === 'row'];
  const hasX = v.x !== 'none';
  const body = [set('vt', load('t')), set('vd1', sub(splat(1), mul(get('vt'), get('vt'))))];
  const g1: string[] = [];
  if (hasX) {
    body.push(set('vzx', load('zx', rx)), set('vgx', load('gx')));
    g1.push(mul(get('vgx'), get('vzx')));
  }
  if (hasX || v.xx === 'full') body.push(set('vgxx', load('gxx')));
  if (v.xx === 'full') g1.push(mul(get('vgxx'), load('zxx')));
  if (v.s !== 'none') {
    body.push(set('vgs', load('gs')));
    g1.push(mul(get('vgs'), load('zs', rs)));
  }
  // For the rule t' = 1 − t²: ∂d1/∂t = −2t and ∂d2/∂t = −2 + 6t² = 4 − 6·d1.
  let gt = load('gv');
  if (g1.length) gt = sub(gt, mul(mul(get('vt'), g1.reduce((a, b) => add(a, b))), splat(2)));
  if (hasX) gt = add(gt, mul(sub(splat(4), mul(get('vd1'), splat(6))), mul(mul(get('vgxx'), get('vzx')), get('vzx'))));
  body.push(store('dz', mul(gt, get('vd1'))));
  // A row channel's gradient accumulates over the points (zeroed by the caller).
  const put = (p: string, value: string, row: boolean) => store(p, row ? add(load(p, true), value) : value, row);
  if (hasX) {
    // 2·d2·z_x·g_xx with 2·d2 = −4t·d1.
    const cross = mul(mul(mul(mul(get('vt'), get('vd1')), splat(-4)), get('vzx')), get('vgxx'));
    body.push(put('dzx', add(mul(get('vgx'), get('vd1')), cross), rx));
  }
  if (v.xx === 'full') body.push(store('dzxx', mul(get('vgxx'), get('vd1'))));
  if (v.s !== 'none') body.push(put('dzs', mul(get('vgs'), get('vd1')), rs));
  const pointers = [...backwardInputs(v), ...backwardOutputs(v)];
  return rowLoopFunction(`bwd_${keyOf(v)}`, pointers, ['vt', 'vd1', 'vzx', 'vgx', 'vgxx', 'vgs'], body);
}

function backwardInputs(v: Variant): string[] {
  return ['t', ...forwardInputs(v).slice(1), ...forwardOutputs(v).map((o) => gradientOf[o])];
}
function backwardOutputs(v: Variant): string[] {
  return forwardInputs(v).map((i) => `d${i}`);
}

/** y = 2x over [n, h] (the Sigmoid argument of tanh z = 2σ(2z) − 1). */
const doubleWat = rowLoopFunction('double', ['x', 'y'], [], [store('y', mul(load('x'), splat(2)))]);

export function jetTanhWat(): string {
  return [doubleWat, ...VARIANTS.map(forwardWat), ...VARIANTS.map(backwardWat)].join('\n');
}

/** Register the forward and backward kernel of every variant, and the forward's gradient (once, from wasm/kernels.ts). */
export function registerJetTanhKernels(tf: Tf, backend: WasmBackend, heap: HeapExports): void {
  const sigmoid = tf.getKernel('Sigmoid', 'wasm');
  if (!sigmoid) throw new Error('the tfjs wasm backend has no Sigmoid kernel, which the fused jet tanh calls');
  const offset = (t: TensorInfo) => heapOffset(backend, t);
  for (const v of VARIANTS) {
    const inputs = forwardInputs(v);
    const outputs = forwardOutputs(v);
    registerHeapKernel(tf, forwardName(v), (ins) => {
      const z = ins.z as TensorInfo;
      const [n, h] = z.shape;
      const twice = backend.makeOutput([n, h], 'float32');
      heap.double(n, h, offset(z), offset(twice));
      const sg = sigmoid.kernelFunc({ inputs: { x: twice }, backend: backend as never, attrs: {} }) as TensorInfo;
      backend.disposeData(twice.dataId);
      const outs = outputs.map(() => backend.makeOutput([n, h], 'float32'));
      heap[`fwd_${keyOf(v)}`](n, h, offset(sg), ...inputs.slice(1).map((k) => offset(ins[k] as TensorInfo)), ...outs.map(offset));
      backend.disposeData(sg.dataId);
      return outs;
    });
    const gradInputs = backwardInputs(v);
    registerHeapKernel(tf, backwardName(v), (ins) => {
      const t = ins.t as TensorInfo;
      const [n, h] = t.shape;
      // Each gradient has the shape of its input: [n, h], or [1, h] for a row channel.
      const outs = inputs.map((k) => backend.makeOutput(k === 'z' ? [n, h] : (ins[k] as TensorInfo).shape, 'float32'));
      outs.forEach((o, i) => {
        if (inputs[i] !== 'z' && o.shape[0] === 1 && n > 1) heapView(backend, o).fill(0);
      });
      heap[`bwd_${keyOf(v)}`](n, h, ...gradInputs.map((k) => offset(ins[k] as TensorInfo)), ...outs.map(offset));
      return outs;
    });
    tf.registerGradient({
      kernelName: forwardName(v),
      inputsToSave: inputs.slice(1),
      outputsToSave: [true],
      gradFunc: (dy: Tensor | Tensor[], saved: Tensor[]) => {
        const dys = Array.isArray(dy) ? dy : [dy];
        const named: Record<string, Tensor> = { t: saved[saved.length - 1] };
        inputs.slice(1).forEach((k, i) => (named[k] = saved[i]));
        outputs.forEach((o, i) => (named[gradientOf[o]] = dys[i]));
        const grads = tf.engine().runKernel(backwardName(v), named) as Tensor[];
        return Object.fromEntries(inputs.map((k, i) => [k, () => grads[i]]));
      },
    });
  }
}

export interface JetTanhChannels {
  t: Tensor;
  dx: Tensor | null;
  dxx: Tensor | null;
  ds: Tensor | null;
}

/**
 * The fused tanh of a jet with values z [n, h] and channels z_x, z_xx, z_s, or null when
 * the shapes are not ones the kernels take (then Jet.tanh runs channel by channel). Call
 * through wasm/kernels.ts.
 */
export function runJetTanh(tf: Tf, z: Tensor, zx: Tensor | null, zxx: Tensor | null, zs: Tensor | null): JetTanhChannels | null {
  if (z.rank !== 2 || z.dtype !== 'float32') return null;
  const [n, h] = z.shape as [number, number];
  if (h % 4 !== 0 || n < 1) return null;
  const form = (c: Tensor | null): Form | null => {
    if (c === null) return 'none';
    if (c.rank !== 2 || c.shape[1] !== h || c.dtype !== 'float32') return null;
    if (c.shape[0] === n) return 'full';
    return c.shape[0] === 1 ? 'row' : null;
  };
  const [x, xx, s] = [form(zx), form(zxx), form(zs)];
  if (x === null || s === null || (xx !== 'none' && xx !== 'full')) return null;
  if (x === 'none' && xx === 'none' && s === 'none') return null;
  const v: Variant = { x, xx, s };
  const ins: Record<string, Tensor> = { z };
  if (zx) ins.zx = zx;
  if (zxx) ins.zxx = zxx;
  if (zs) ins.zs = zs;
  const outs = tf.engine().runKernel(forwardName(v), ins) as Tensor[];
  const names = forwardOutputs(v);
  const pick = (k: string) => (names.includes(k) ? outs[names.indexOf(k)] : null);
  return { t: outs[0], dx: pick('ox'), dxx: pick('oxx'), ds: pick('os') };
}

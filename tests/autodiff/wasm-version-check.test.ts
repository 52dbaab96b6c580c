/**
 * The WASM kernels reach into tfjs 4.22.0's backend internals, so they are installed only on
 * that version (src/autodiff/wasm/kernels.ts); on any other the user gets a warning and the
 * trainer runs on tfjs's own ops. The fallback is checked in a fresh Node process on the
 * built modules (dist/, built by the global test setup), where the install is first asked
 * with another tfjs-core version: the kernels must then stay out (no aliasing copies either),
 * the backend must say so on stderr, and a jet tanh must still give tanh and its derivatives
 * (d/dz tanh = 1 − tanh², d²/dz² tanh = −2 tanh (1 − tanh²): any calculus table).
 */
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { KERNELS_TFJS_VERSION, versionMismatch } from '../../src/autodiff/wasm/kernels.js';

const dist = fileURLToPath(new URL('../../dist/', import.meta.url));

describe('tfjs version check of the WASM kernels', () => {
  it('accepts the version the kernels were written against and names the packages that differ', () => {
    expect(KERNELS_TFJS_VERSION).toBe('4.22.0');
    expect(versionMismatch({ core: '4.22.0', wasmBackend: '4.22.0' })).toBeNull();
    const core = versionMismatch({ core: '4.23.1', wasmBackend: '4.22.0' })!;
    expect(core).toContain('@tensorflow/tfjs-core 4.23.1');
    expect(core).not.toContain('tfjs-backend-wasm');
    expect(core).toContain('4.22.0');
    const both = versionMismatch({ core: '5.0.0', wasmBackend: '5.0.0' })!;
    expect(both).toContain('@tensorflow/tfjs-core 5.0.0');
    expect(both).toContain('@tensorflow/tfjs-backend-wasm 5.0.0');
  });

  it('on another version: a warning, no kernels of ours, and a jet tanh that is still right', () => {
    const script = `
const tf = await import('@tensorflow/tfjs');
const kernels = await import(${JSON.stringify(dist + 'autodiff/wasm/kernels.js')});
const first = await kernels.installWasmKernels(tf, { core: '4.21.0', wasmBackend: '4.22.0' });
const { selectBackend } = await import(${JSON.stringify(dist + 'autodiff/backend.js')});
const { Jet } = await import(${JSON.stringify(dist + 'autodiff/jet.js')});
const handle = await selectBackend('wasm');
const z = tf.tensor2d([-1.5, -0.2, 0.3, 2], [1, 4]);
const zx = tf.tensor2d([1, 1, 1, 1], [1, 4]);
const out = new Jet(tf, z, zx, null, null).tanh();
const a = tf.tensor1d([1, 2, 3, 4]);
const offset = (t) => tf.backend().getMemoryOffset(t.dataId);
console.log(JSON.stringify({
  first,
  backend: handle.backend,
  kernels: kernels.wasmKernels(tf),
  aliased: offset(tf.clone(a)) === offset(a),
  z: Array.from(z.dataSync()),
  t: Array.from(out.v.dataSync()),
  dx: Array.from(out.dx.dataSync()),
  dxx: Array.from(out.dxx.dataSync()),
}));`;
    const r = spawnSync(process.execPath, ['--input-type=module', '-e', script], { encoding: 'utf8', timeout: 120_000 });
    expect(r.status, r.stderr).toBe(0);
    const got = JSON.parse(r.stdout.trim().split('\n').pop()!);
    expect(got.first).toContain('@tensorflow/tfjs-core 4.21.0');
    expect(r.stderr).toContain('@tensorflow/tfjs-core 4.21.0');
    expect(got.backend).toBe('wasm');
    expect(got.kernels).toBeNull();
    expect(got.aliased).toBe(false);
    got.z.forEach((z: number, i: number) => {
      const t = Math.tanh(z);
      expect(Math.abs(got.t[i] - t)).toBeLessThan(1e-6);
      expect(Math.abs(got.dx[i] - (1 - t * t))).toBeLessThan(1e-6);
      expect(Math.abs(got.dxx[i] - -2 * t * (1 - t * t))).toBeLessThan(1e-6);
    });
  }, 120_000);
});

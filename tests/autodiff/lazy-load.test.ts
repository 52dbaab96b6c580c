/**
 * Commands that never train must not load tfjs (start-up time, and the WASM binary).
 * Checked in a fresh Node process on the built modules (dist/, built by the global test
 * setup): importing the modules of the three network layers (src/autodiff, src/network,
 * src/training) leaves tfjs's global engine
 * (globalThis._tfengine, created when @tensorflow/tfjs-core is evaluated) undefined, and
 * selectBackend creates it (so the probe can tell the two apart).
 */
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';

const dist = fileURLToPath(new URL('../../dist/', import.meta.url));
const modules = [
  'autodiff/backend',
  'autodiff/jet',
  'autodiff/mlp',
  'autodiff/parameters',
  'autodiff/wasm/kernels',
  'numerics/random',
  'network/features',
  'network/field-net',
  'network/propagator-net',
  'network/problem/scft-problem',
  'training/train-loop',
  'training/train-run',
];

function probe(select: boolean): string {
  const imports = modules.map((m) => `await import(${JSON.stringify(dist + m + '.js')});`).join('\n');
  const script = `${imports}
${select ? `const b = await import(${JSON.stringify(dist + 'autodiff/backend.js')}); await b.selectBackend('cpu');` : ''}
console.log(typeof globalThis._tfengine);`;
  const r = spawnSync(process.execPath, ['--input-type=module', '-e', script], { encoding: 'utf8', timeout: 60_000 });
  expect(r.status, r.stderr).toBe(0);
  return r.stdout.trim();
}

describe('lazy tfjs', () => {
  it('importing the modules of the network layers does not load tfjs; selecting a backend does', () => {
    expect(probe(false)).toBe('undefined');
    expect(probe(true)).toBe('object');
  });
});

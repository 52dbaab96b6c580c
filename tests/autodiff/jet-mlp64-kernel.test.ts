import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { JetMlp64 } from '../../src/autodiff/jet-mlp64.js';
import { jetKernelModule, loadJetKernels, setJetKernelModule } from '../../src/autodiff/jet-mlp64-kernel.js';
import { Xorshift128 } from '../../src/numerics/random.js';

// The f64x2 jet passes against the JS passes they replace (the same operations in the same
// order, so the same bits: compared with Object.is, which also tells −0 from +0 and sees NaN),
// and the reverse sweep of both against central differences of the forward jet in θ (the
// definition of the gradient; common practice, no source).
let module: WebAssembly.Module | null = null;
let before: WebAssembly.Module | null = null;
beforeAll(async () => {
  before = jetKernelModule();
  module = await loadJetKernels();
});
// Test files share one module registry per worker: leave the module as this file found it.
afterAll(() => setJetKernelModule(before));

function made(on: boolean, inputs: number, hidden: number[], outputs: number, activation: 'tanh' | 'sin', offset: number): JetMlp64 {
  setJetKernelModule(on ? module : null);
  try {
    return new JetMlp64(inputs, hidden, outputs, activation, offset);
  } finally {
    setJetKernelModule(before);
  }
}

const SHAPES: [string, number, number[], number][] = [
  ['a propagator piece (13 → 16 → 16 → 1)', 13, [16, 16], 1],
  ['odd widths (7 → 9 → 3 → 3)', 7, [9, 3], 3],
  ['no hidden layer (5 → 2)', 5, [], 2],
];

function pointInput(rng: Xorshift128, n: number) {
  // As the residual system's inputs: σ last, with ∂s only on σ and no ∂x, ∂xx on it (zeros the passes skip).
  const v = Float64Array.from({ length: n }, () => rng.next() * 2 - 1);
  const dx = Float64Array.from({ length: n }, (_, i) => (i < n - 1 ? rng.next() * 2 - 1 : 0));
  const dxx = Float64Array.from({ length: n }, (_, i) => (i < n - 1 ? rng.next() * 2 - 1 : 0));
  const ds = Float64Array.from({ length: n }, (_, i) => (i === n - 1 ? 1.7 : 0));
  return { v, dx, dxx, ds };
}

function sameBits(a: ArrayLike<number>, b: ArrayLike<number>): string[] {
  const bad: string[] = [];
  for (let i = 0; i < a.length; i++) if (!Object.is(a[i], b[i])) bad.push(`${i}: ${a[i]} vs ${b[i]}`);
  return bad;
}

describe('JetMlp64 on the f64x2 passes', () => {
  it('the module assembles on this Node (WebAssembly SIMD)', () => {
    expect(module).not.toBeNull();
  });

  for (const [name, nin, hidden, nout] of SHAPES) {
    it(`${name}: forward (full and value) and backward give the JS passes' bits`, () => {
      const offset = 5;
      const js = made(false, nin, hidden, nout, 'tanh', offset);
      const wasm = made(true, nin, hidden, nout, 'tanh', offset);
      const rng = new Xorshift128(11 + nin);
      const theta = Float64Array.from({ length: offset + js.size + 3 }, () => (rng.next() * 2 - 1) * 0.8);
      for (let p = 0; p < 20; p++) {
        const input = pointInput(rng, nin);
        const channels = p % 3 === 2 ? 'value' : 'full';
        const yj = Float64Array.from(js.forward(theta, input, channels));
        const yw = Float64Array.from(wasm.forward(theta, input, channels));
        expect(sameBits(channels === 'full' ? yj : yj.subarray(0, nout), channels === 'full' ? yw : yw.subarray(0, nout))).toEqual([]);
        const seed = Float64Array.from({ length: 4 * nout }, (_, i) => (channels === 'value' && i >= nout ? 0 : rng.next() * 2 - 1));
        // A gradient vector with content of its own around and inside the slice: backward adds to it.
        const start = Float64Array.from({ length: theta.length }, () => rng.next());
        const gj = Float64Array.from(start);
        const gw = Float64Array.from(start);
        js.backward(theta, seed, gj, 0.7);
        wasm.backward(theta, seed, gw, 0.7);
        expect(sameBits(gj, gw)).toEqual([]);
      }
    });
  }

  it('the sin activation keeps the JS passes (no tanh kernel for it): the same bits', () => {
    const js = made(false, 4, [6], 2, 'sin', 0);
    const other = made(true, 4, [6], 2, 'sin', 0);
    const rng = new Xorshift128(3);
    const theta = Float64Array.from({ length: js.size }, () => rng.next() - 0.5);
    const input = pointInput(rng, 4);
    expect(sameBits(js.forward(theta, input, 'full'), other.forward(theta, input, 'full'))).toEqual([]);
  });

  for (const on of [false, true]) {
    it(`${on ? 'f64x2' : 'JS'} reverse sweep: the gradient of a channel combination equals central differences`, () => {
      const net = made(on, 13, [16, 16], 1, 'tanh', 0);
      const rng = new Xorshift128(29);
      const theta = Float64Array.from({ length: net.size }, () => (rng.next() * 2 - 1) * 0.6);
      const input = pointInput(rng, 13);
      const seed = Float64Array.of(1, -0.4, 0.25, 0.8);
      const combination = (th: Float64Array) => {
        const y = net.forward(th, input, 'full');
        return seed[0] * y[0] + seed[1] * y[1] + seed[2] * y[2] + seed[3] * y[3];
      };
      net.forward(theta, input, 'full');
      const grad = new Float64Array(net.size);
      net.backward(theta, seed, grad);
      const h = 1e-6;
      let worst = 0;
      for (let k = 0; k < net.size; k += 7) {
        const up = Float64Array.from(theta);
        const down = Float64Array.from(theta);
        up[k] += h;
        down[k] -= h;
        const fd = (combination(up) - combination(down)) / (2 * h);
        worst = Math.max(worst, Math.abs(fd - grad[k]) / Math.max(1, Math.abs(fd)));
      }
      expect(worst).toBeLessThan(1e-7);
    });
  }
});

import { describe, expect, it } from 'vitest';
import { selectBackend } from '../../src/autodiff/backend.js';
import { Jet } from '../../src/autodiff/jet.js';
import { JetMlp64 } from '../../src/autodiff/jet-mlp64.js';
import { Mlp } from '../../src/autodiff/mlp.js';
import { ParameterSet } from '../../src/autodiff/parameters.js';

// The float64 jet MLP against the tfjs jet MLP (an independent implementation of the same
// network and channel rules, in float32), value and every derivative channel, both activations.
describe('JetMlp64', () => {
  for (const activation of ['tanh', 'sin'] as const) {
    it(`${activation}: value, ∂x, ∂xx, ∂s equal the tfjs jets at random points`, async () => {
      const { tf } = await selectBackend('cpu');
      const spec = { inputs: 3, hidden: [7, 5], outputs: 2, activation, seed: 5, name: 'probe' };
      const mlp = new Mlp(tf, spec);
      const params = new ParameterSet(tf, mlp.entries);
      const theta = params.flatten();
      const m64 = new JetMlp64(3, [7, 5], 2, activation, 0);
      expect(m64.size).toBe(theta.length);
      const n = 6;
      const v = Float32Array.from({ length: n * 3 }, (_, i) => Math.sin(1.3 * i));
      const dx = Float32Array.from({ length: n * 3 }, (_, i) => Math.cos(0.7 * i));
      const dxx = Float32Array.from({ length: n * 3 }, (_, i) => Math.sin(0.4 * i + 1));
      const ds = Float32Array.from({ length: n * 3 }, (_, i) => 0.5 * Math.cos(0.9 * i));
      const t = tf.tidy(() => {
        const y = mlp.forward(new Jet(tf, tf.tensor2d(v, [n, 3]), tf.tensor2d(dx, [n, 3]), tf.tensor2d(dxx, [n, 3]), tf.tensor2d(ds, [n, 3])));
        return [y.v, y.dx!, y.dxx!, y.ds!].map((c) => Array.from(c.dataSync()));
      });
      for (let p = 0; p < n; p++) {
        const sl = (a: Float32Array) => Float64Array.from(a.subarray(3 * p, 3 * p + 3));
        const y = m64.forward(theta, { v: sl(v), dx: sl(dx), dxx: sl(dxx), ds: sl(ds) }, 'full');
        for (let c = 0; c < 4; c++) for (let o = 0; o < 2; o++) expect(Math.abs(y[c * 2 + o] - t[c][p * 2 + o])).toBeLessThan(1e-5 * Math.max(1, Math.abs(t[c][p * 2 + o])));
      }
      params.dispose();
    });
  }
});

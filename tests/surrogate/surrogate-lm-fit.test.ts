/**
 * The surrogate's field fit by Levenberg–Marquardt (warmStart.method 'levenberg-marquardt',
 * src/surrogate/surrogate-lm-fit.ts):
 *   - its Jacobian against central differences of its own residuals (an independent method:
 *     common practice, no source);
 *   - a whole surrogate run on a tiny χN × f box (3 × 3 anchors), checked at the anchor-cell
 *     centres against fresh spectral reference solves there (the reference solver is checked
 *     against Leibler's RPA, analytic propagators and an independent finite-difference
 *     solver in tests/spectral).
 */
import { worstJacobianColumnError } from '../helpers/jacobian-check.js';
import { describe, expect, it } from 'vitest';
import { surrogateConfigSchema } from '../../src/io/schemas/surrogate-config.js';
import type { SurrogateConfigInput } from '../../src/io/schemas/surrogate-config.js';
import { selectBackend } from '../../src/autodiff/backend.js';
import type { DenseLinearisation } from '../../src/numerics/levenberg-marquardt.js';
import { fieldFitProblem } from '../../src/surrogate/surrogate-lm-fit.js';
import { SurrogateModel, fractionalGrid } from '../../src/surrogate/surrogate-model.js';
import { surrogateRun } from '../../src/surrogate/surrogate-run.js';

const cfg = (c: Omit<SurrogateConfigInput, 'version' | 'kind'>) => surrogateConfigSchema.parse({ version: 2, kind: 'surrogate', backend: 'wasm', ...c });

describe('surrogate field fit by Levenberg–Marquardt', () => {
  it('the Jacobian of the fit residuals matches central differences', async () => {
    const { tf } = await selectBackend('wasm');
    const config = cfg({ parameters: { chiN: { min: 12, max: 16, anchors: 2 }, f: { min: 0.45, max: 0.55, anchors: 2 } }, networks: { field: { hidden: [5, 4], fourierModes: 2 } } });
    const model = new SurrogateModel(tf, config, { axes: [[12, 16], [0.45, 0.55]], periods: [3.6, 3.7, 3.6, 3.7] });
    try {
      const points = [
        { chiN: 13, f: 0.47, segmentRatio: 1 },
        { chiN: 15.5, f: 0.52, segmentRatio: 1 },
      ];
      const nx = 6;
      const targets = points.map((p, k) => ({ point: p, w: { A: Float64Array.from({ length: nx }, (_, j) => Math.cos(j + k) * p.chiN), B: Float64Array.from({ length: nx }, (_, j) => Math.sin(j - k) * p.chiN) } }));
      const groups = points.map((p) => model.group(p, fractionalGrid(nx)));
      const problem = fieldFitProblem(model.field, groups, targets);
      const x = model.parameters.flatten();
      expect(problem.size).toBe(x.length);
      const lin = problem.linearise(x) as DenseLinearisation;
      expect(lin.m).toBe(2 * nx * points.length);
      // The fit's cost is half the mean square misfit of n = w/χN, as the tfjs forward pass gives it.
      const out = tf.tidy(() => model.field.forward(model.field.features(groups)).dataSync() as Float32Array);
      let ms = 0;
      targets.forEach((d, k) => d.w.A.forEach((_, j) => (ms += (out[2 * (k * nx + j)] - d.w.A[j] / d.point.chiN) ** 2 + (out[2 * (k * nx + j) + 1] - d.w.B[j] / d.point.chiN) ** 2)));
      expect(lin.cost).toBeCloseTo(ms / (2 * lin.m), 6);
      expect(worstJacobianColumnError(problem, x, [0, 7, 19, problem.size - 11, problem.size - 1])).toBeLessThan(1e-8);
    } finally {
      model.dispose();
    }
  });

  it('a χN × f surrogate fitted by LM meets the spectral reference at the anchor-cell centres', async () => {
    const config = cfg({
      parameters: { chiN: { min: 14, max: 16, anchors: 3 }, f: { min: 0.46, max: 0.54, anchors: 3 } },
      cell: { nx: 32, ns: 40 },
      networks: { field: { hidden: [10], fourierModes: 4 } },
      warmStart: { method: 'levenberg-marquardt', lmIterations: 40 },
      training: { rounds: 0 },
      evaluation: { random: 0 },
    });
    const run = await surrogateRun({ config });
    try {
      const m = run.metrics;
      expect(m.training.fit.method).toBe('levenberg-marquardt');
      expect(m.heldOut.map((e) => [e.point.chiN, e.point.f])).toEqual([
        [14.5, 0.48],
        [15.5, 0.48],
        [14.5, 0.52],
        [15.5, 0.52],
      ]);
      // Measured here (wasm, 3 × 3 anchors on nx = 32, 40 LM iterations, fit loss 3.4e-6): 1.07e-3, 2.10e-3,
      // 1.78e-3, 7.9e-4 in the order above, against 3.98e-3, 3.28e-3, 3.77e-3, 3.11e-3 for the anchors interpolated;
      // the bound leaves about twice the largest. The 1e-3 over χN 12–20 × f 0.4–0.6 is a larger run:
      // docs/surrogate.md.
      const errors = m.heldOut.map((e) => `χN = ${e.point.chiN}, f = ${e.point.f}: ${e.phiA.relativeL2.toExponential(2)} (anchors interpolated ${e.anchorInterpolationPhiA.toExponential(2)})`).join('; ');
      for (const e of m.heldOut) {
        expect(e.phiA.relativeL2, errors).toBeLessThan(4e-3);
        // The network beats the cheapest use of the same reference solves (the anchors' profiles interpolated).
        expect(e.phiA.relativeL2, errors).toBeLessThan(e.anchorInterpolationPhiA);
      }
    } finally {
      run.model.dispose();
    }
  });
});

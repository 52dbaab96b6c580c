/**
 * The data-parallel bench splits the like-for-like problem's points into shares, one per
 * worker, and adds their losses and gradients (src/bench/data-parallel.ts). That is right
 * only if the shares' losses and gradients add up to the unsplit problem's: the mean over
 * all points is the sum of the shares' partial sums (linearity of the sum and of the
 * gradient; common practice, no source). Checked here in one process, on the wasm backend.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import type * as TfModule from '@tensorflow/tfjs';
import { likeForLikeProblem } from '../../src/bench/like-for-like.js';
import { selectBackend, type Tf } from '../../src/autodiff/backend.js';
import { expectClose } from '../helpers/expect-close.js';

describe('point shares of the like-for-like problem', () => {
  let tf: Tf;
  beforeAll(async () => {
    tf = (await selectBackend('wasm')).tf;
  });

  it('two shares add up to the whole problem in loss and every parameter gradient', () => {
    const whole = likeForLikeProblem(tf, 8, 512, 4);
    const shares = [0, 1].map((index) => likeForLikeProblem(tf, 8, 512, 4, { index, count: 2 }));
    const evalOf = (p: typeof whole) =>
      tf.tidy(() => {
        const { value, grads } = tf.variableGrads(() => p.loss('fast'), p.params.variables());
        return { loss: value.dataSync()[0], grads: p.params.flattenGradients(grads as TfModule.NamedTensorMap) };
      });
    const w = evalOf(whole);
    const [a, b] = shares.map(evalOf);
    // Each share is about half of the whole, not the whole (the split really splits).
    expect(a.loss).toBeLessThan(0.8 * w.loss);
    expectClose([a.loss + b.loss], [w.loss], 1e-6, 'loss');
    expectClose(
      a.grads.map((g, i) => g + b.grads[i]),
      w.grads,
      1e-5,
      'gradients',
    );
    expect(() => likeForLikeProblem(tf, 8, 512, 4, { index: 0, count: 3 })).toThrow(/do not split into 3/);
    for (const p of [whole, ...shares]) p.dispose();
  });
});

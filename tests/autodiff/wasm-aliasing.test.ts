/**
 * The WASM backend's Identity and same-dtype Cast share memory instead of copying
 * (src/autodiff/wasm/aliasing-copies.ts). What must hold is tfjs's own contract for these
 * ops (the plain-JS backend implements Identity the same way): the result has the input's
 * values, shape and dtype; either tensor can be disposed first without touching the other;
 * the memory is released when the last one goes; a Cast that changes dtype still converts.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { selectBackend, type Tf } from '../../src/autodiff/backend.js';
import { likeForLikeProblem } from '../../src/bench/like-for-like.js';

describe('aliasing Identity and Cast on the wasm backend', () => {
  let tf: Tf;
  beforeAll(async () => {
    tf = (await selectBackend('wasm')).tf;
  });

  it('clone and same-dtype cast keep values after either side is disposed, and free the memory at the end', () => {
    const before = tf.memory().numBytes;
    const a = tf.tensor2d([1.5, -2, 3.25, 4], [2, 2]);
    const b = tf.clone(a);
    const c = tf.cast(a, 'float32');
    // Shared, not copied: the same place in the WASM heap.
    const offset = (t: typeof a) => (tf.backend() as unknown as { getMemoryOffset(id: object): number }).getMemoryOffset(t.dataId);
    expect(offset(b)).toBe(offset(a));
    expect(offset(c)).toBe(offset(a));
    expect(b.dtype).toBe('float32');
    expect(b.shape).toEqual([2, 2]);
    a.dispose();
    expect(Array.from(b.dataSync())).toEqual([1.5, -2, 3.25, 4]);
    b.dispose();
    expect(Array.from(c.dataSync())).toEqual([1.5, -2, 3.25, 4]);
    c.dispose();
    expect(tf.memory().numBytes).toBe(before);
  });

  it('a cast that changes dtype still converts (truncation toward zero, as tfjs documents)', () => {
    tf.tidy(() => {
      const i = tf.cast(tf.tensor1d([1.7, -2.7, 3]), 'int32');
      expect(i.dtype).toBe('int32');
      expect(Array.from(i.dataSync())).toEqual([1, -2, 3]);
      const f = tf.cast(i, 'float32');
      expect(f.dtype).toBe('float32');
      expect(Array.from(f.dataSync())).toEqual([1, -2, 3]);
    });
  });

  it('training steps leave no tensors or bytes behind', () => {
    const p = likeForLikeProblem(tf, 8, 256, 5);
    p.step('fast');
    const { numTensors, numBytes } = tf.memory();
    for (let i = 0; i < 5; i++) p.step('fast');
    expect(tf.memory().numTensors).toBe(numTensors);
    expect(tf.memory().numBytes).toBe(numBytes);
    p.dispose();
  });
});

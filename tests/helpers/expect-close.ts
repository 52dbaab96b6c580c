import { expect } from 'vitest';

/** max |a − b| ≤ rel · max(1, max |b|): float32 results against a reference, scaled. */
export function expectClose(actual: ArrayLike<number>, expected: ArrayLike<number>, rel: number, what: string): void {
  expect(actual.length, what).toBe(expected.length);
  let scale = 1;
  let err = 0;
  for (let i = 0; i < expected.length; i++) {
    scale = Math.max(scale, Math.abs(expected[i]));
    err = Math.max(err, Math.abs(actual[i] - expected[i]));
  }
  expect(err, `${what}: max error ${err.toExponential(2)} at scale ${scale.toExponential(2)}`).toBeLessThanOrEqual(rel * scale);
}

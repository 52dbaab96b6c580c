import { describe, expect, it } from 'vitest';
import { trainingRecords } from '../../src/reports/readers/training-history.js';

// The checkpoint's history (docs/second-order-training.md, "History"): L-BFGS and second-order
// entries keep the Adam step count in `step` and count their own iterations apart.
describe('training history on one iteration axis', () => {
  it('counts a second-order phase by its own iterations, after the warm start and Adam', () => {
    const history = [
      ...[1, 2, 3].map((step) => ({ stage: 'warm-start' as const, step, total: 1 / step, terms: {}, learningRate: 0.01, seconds: step })),
      ...[1, 2].map((step) => ({ stage: 'adam' as const, step, total: 0.1 / step, terms: {}, learningRate: 1e-3, seconds: 3 + step })),
      ...[1, 2, 3, 4].map((i) => ({ stage: 'second-order' as const, step: 2, secondOrderIterations: i, total: 0.01 / i, terms: {}, learningRate: 0, seconds: 5 + i })),
    ];
    const { phases, records } = trainingRecords(history);
    expect(phases.map((p) => [p.name, p.iterations])).toEqual([
      ['warm start', 3],
      ['Adam', 2],
      ['second order', 4],
    ]);
    expect(records.map((r) => r.iteration)).toEqual([1, 2, 3, 4, 5, 6, 7, 8, 9]);
  });
});

/**
 * Adaptive sampling of the surrogate's extra reference solves (src/surrogate/adaptive-points.ts):
 *   - the selection keeps the largest residuals first and no two points within half an anchor
 *     cell (the rule of the module, checked on a hand-made ranking);
 *   - the residual it ranks by points at the network's error: on a field network fitted to
 *     the anchors, the φ_A error against fresh spectral reference solves (the reference is
 *     checked against Leibler's RPA and independent solvers in tests/spectral) is larger at
 *     the candidate with the largest residual than at the one with the smallest;
 *   - a run with adaptive solves keeps the same held-out points as one without (the choice
 *     never sees them) and records where it solved.
 */
import { describe, expect, it } from 'vitest';
import { surrogateConfigSchema } from '../../src/io/schemas/surrogate-config.js';
import type { SurrogateConfigInput } from '../../src/io/schemas/surrogate-config.js';
import { ParameterSpace } from '../../src/surrogate/parameter-space.js';
import { adaptivePoints, rankByResidual, spreadOut } from '../../src/surrogate/adaptive-points.js';
import { surrogateRun } from '../../src/surrogate/surrogate-run.js';
import { solveReference } from '../../src/surrogate/reference-solves.js';
import { heldOutErrors } from '../../src/surrogate/error-map.js';

const cfg = (c: Omit<SurrogateConfigInput, 'version' | 'kind'>) => surrogateConfigSchema.parse({ version: 2, kind: 'surrogate', backend: 'wasm', ...c });

describe('adaptive reference solves of a surrogate', () => {
  it('keeps the largest residuals first, no two within half an anchor cell', () => {
    // χN 12–20 with 5 anchors (cell 2, half cell 1 in χN), f 0.4–0.6 with 3 anchors (cell 0.1, half cell 0.05).
    const space = new ParameterSpace(cfg({ parameters: { chiN: { min: 12, max: 20, anchors: 5 }, f: { min: 0.4, max: 0.6, anchors: 3 } } }));
    const p = (chiN: number, f: number) => space.point([chiN, f]);
    const ranked = [
      { point: p(12.5, 0.42), residual: 9 },
      { point: p(13.2, 0.44), residual: 8 }, // within half a cell of the first on both axes: skipped
      { point: p(13.2, 0.5), residual: 7 }, // 0.08 away in f: kept
      { point: p(19, 0.58), residual: 6 },
      { point: p(16, 0.5), residual: 5 },
    ];
    const kept = spreadOut(space, ranked, 3).map((r) => r.residual);
    expect(kept).toEqual([9, 7, 6]);
    expect(spreadOut(space, ranked, 10).map((r) => r.residual)).toEqual([9, 7, 6, 5]);
  });

  it('the largest residual marks a larger φ_A error than the smallest; held-out points unchanged', async () => {
    const base = {
      parameters: { chiN: { min: 14, max: 16, anchors: 3 }, f: { min: 0.46, max: 0.54, anchors: 3 } },
      cell: { nx: 32, ns: 40 },
      networks: { field: { hidden: [10], fourierModes: 4 } },
      training: { rounds: 0 },
      evaluation: { random: 1 },
    } as const;
    const plain = await surrogateRun({ config: cfg({ ...base, warmStart: { method: 'levenberg-marquardt', lmIterations: 30 } }) });
    try {
      const space = new ParameterSpace(plain.model.config);
      const ranked = rankByResidual(space, plain.model, Array.from({ length: 24 }, (_, k) => space.point([14 + (2 * ((k * 7) % 24)) / 23, 0.46 + (0.08 * ((k * 11) % 24)) / 23])));
      expect(ranked[0].residual).toBeGreaterThan(2 * ranked[ranked.length - 1].residual);
      // Against fresh reference solves: the network's φ_A is further off where its residual is largest than where it is smallest.
      const ends = [ranked[0].point, ranked[ranked.length - 1].point];
      const refs = ends.map((p) => ({ point: p, solution: solveReference(space, plain.model.config, p, { role: 'test point' }) }));
      const [worst, best] = heldOutErrors(space, plain.model.solutions(ends), refs, plain.anchors).map((e) => e.phiA.relativeL2);
      expect(worst).toBeGreaterThan(best);
      const picked = adaptivePoints(space, plain.model, 3, 24, 5);
      expect(picked.length).toBe(3);
      for (const r of picked) expect(space.outside(r.point)).toEqual([]);
    } finally {
      plain.model.dispose();
    }
    const adaptive = await surrogateRun({ config: cfg({ ...base, warmStart: { method: 'levenberg-marquardt', lmIterations: 30, adaptiveSolves: 2, adaptiveCandidates: 24, adaptiveIterations: 10 } }) });
    try {
      const a = adaptive.metrics.timing.adaptiveSolves!;
      expect(a.count).toBe(2);
      expect(adaptive.metrics.training.fit.points).toBe(9 + 2);
      expect(adaptive.metrics.heldOut.map((e) => e.point)).toEqual(plain.metrics.heldOut.map((e) => e.point));
    } finally {
      adaptive.model.dispose();
    }
  });
});

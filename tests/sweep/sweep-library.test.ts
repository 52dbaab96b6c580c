/**
 * The sweep library (src/sweep): sharding, worker threads, resume and merge must not
 * change a single number, and the verdicts must agree with Leibler's mean-field theory.
 */
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { sweepConfigSchema } from '../../src/io/schemas/sweep-config.js';
import type { SweepConfigInput } from '../../src/io/schemas/sweep-config.js';
import { axisValues, sweepPoints } from '../../src/sweep/grid.js';
import { mergeShards } from '../../src/sweep/merge.js';
import { runSweep } from '../../src/sweep/run-sweep.js';
import type { SweepRunResult } from '../../src/sweep/run-sweep.js';
import { formatIndices, shardIndices } from '../../src/sweep/shard.js';
import type { SweepPointResult } from '../../src/sweep/solve-point.js';

const tmp = () => mkdtempSync(join(tmpdir(), 'mesofield-sweep-'));
const config = (parameters: SweepConfigInput['parameters']) => sweepConfigSchema.parse({ version: 2, kind: 'sweep', parameters, cell: { nx: 32, ns: 40 } });

// Two values on every axis (8 points), one of them near the transition.
const small = config({ chiN: [11, 15], f: [0.45, 0.5], segmentRatio: [1, 1.3] });

/** Everything but the wall time, which is the one field allowed to differ. */
const numbers = (ps: SweepPointResult[]) => ps.map(({ seconds: _, ...rest }) => rest);

describe('sweep grid and shards', () => {
  it('expands ranges with exact end points and orders points f, then b_A/b_B, then χN', () => {
    expect(axisValues({ from: 10, to: 18, count: 9 })).toEqual([10, 11, 12, 13, 14, 15, 16, 17, 18]);
    expect(axisValues({ from: 0.1, to: 0.7, count: 3 })[2]).toBe(0.7);
    const pts = sweepPoints(small);
    expect(pts.map((p) => [p.f, p.segmentRatio, p.chiN])).toEqual([
      [0.45, 1, 11], [0.45, 1, 15], [0.45, 1.3, 11], [0.45, 1.3, 15],
      [0.5, 1, 11], [0.5, 1, 15], [0.5, 1.3, 11], [0.5, 1.3, 15],
    ]);
    expect(pts.map((p) => p.index)).toEqual([0, 1, 2, 3, 4, 5, 6, 7]);
  });

  it('the shards of a split partition the grid', () => {
    for (const n of [1, 2, 3, 7, 12]) {
      const all = Array.from({ length: n }, (_, i) => shardIndices(10, { index: i + 1, count: n })).flat();
      expect(all.sort((a, b) => a - b)).toEqual([...Array(10).keys()]);
    }
    expect(formatIndices([9, 3, 4, 5, 1])).toBe('1, 3–5, 9');
  });
});

describe('sweep runs', () => {
  let whole: SweepRunResult;
  let wholeDir: string;
  beforeAll(async () => {
    wholeDir = tmp();
    whole = await runSweep({ config: small, outDir: wholeDir, workers: 1 });
  });

  it('an unsharded run writes the full table of converged points', () => {
    expect(whole.status).toBe('ran');
    expect(whole.table!.points.map((p) => p.index)).toEqual([0, 1, 2, 3, 4, 5, 6, 7]);
    for (const p of whole.table!.points) expect(p.converged).toBe(true);
    const csv = readFileSync(join(wholeDir, 'sweep.csv'), 'utf8').trim().split('\n');
    expect(csv).toHaveLength(9);
    // The CSV carries the same float64 values as the JSON (shortest round-trip text).
    const F = csv.slice(1).map((l) => Number(l.split(',')[6]));
    expect(F).toEqual(whole.table!.points.map((p) => p.freeEnergy));
    const json = JSON.parse(readFileSync(join(wholeDir, 'sweep.json'), 'utf8'));
    expect(json.kind).toBe('sweep-table');
    expect(json.provenance.tool).toBe('mesofield');
    expect(json.config.parameters.chiN).toEqual([11, 15]);
  });

  it('two worker threads give the same numbers as one', async () => {
    const two = await runSweep({ config: small, outDir: tmp(), workers: 2 });
    expect(numbers(two.table!.points)).toEqual(numbers(whole.table!.points));
  });

  it('two shards merged equal the unsharded sweep to the bit; a finished shard is not solved again', async () => {
    const dir = tmp();
    const one = await runSweep({ config: small, outDir: dir, shard: { index: 1, count: 2 }, workers: 1 });
    const two = await runSweep({ config: small, outDir: dir, shard: { index: 2, count: 2 }, workers: 1 });
    expect(one.shard.indices).toEqual([0, 2, 4, 6]);
    expect(two.shard.indices).toEqual([1, 3, 5, 7]);
    expect(one.table).toBeUndefined();
    const merged = mergeShards([dir]);
    expect(numbers(merged.points)).toEqual(numbers(whole.table!.points));
    expect(merged.shards).toHaveLength(2);

    const before = readFileSync(one.shardFile, 'utf8');
    const messages: string[] = [];
    let solved = 0;
    const again = await runSweep({ config: small, outDir: dir, shard: { index: 1, count: 2 }, workers: 1, log: (m) => messages.push(m), onPoint: () => solved++ });
    expect(again.status).toBe('skipped');
    expect(solved).toBe(0);
    expect(messages.join('\n')).toMatch(/shard-1-of-2 .* already complete .*skipped/);
    expect(readFileSync(one.shardFile, 'utf8')).toBe(before);
  });

  it('an interrupted shard resumes from the points it saved', async () => {
    const dir = tmp();
    let seen = 0;
    const stop = new Error('interrupted for the test');
    await expect(
      runSweep({
        config: small,
        outDir: dir,
        workers: 1,
        onPoint: () => {
          if (++seen === 3) throw stop;
        },
      }),
    ).rejects.toBe(stop);
    const partial = JSON.parse(readFileSync(join(dir, 'shard-1-of-1.json'), 'utf8'));
    expect(partial.complete).toBe(false);
    expect(partial.points.map((p: SweepPointResult) => p.index)).toEqual([0, 1, 2]);
    expect(() => mergeShards([dir])).toThrow(/unfinished shards .*3 of 8 points/);

    const solvedNow: number[] = [];
    const messages: string[] = [];
    const resumed = await runSweep({ config: small, outDir: dir, workers: 1, log: (m) => messages.push(m), onPoint: (p) => solvedNow.push(p.index) });
    expect(resumed.status).toBe('resumed');
    expect(solvedNow).toEqual([3, 4, 5, 6, 7]);
    expect(messages.join('\n')).toMatch(/resuming .* 3 of 8 points already saved, 5 to solve/);
    expect(numbers(resumed.table!.points)).toEqual(numbers(whole.table!.points));
  });

  it('a merge names missing and repeated points, unfinished shards and mixed configs', async () => {
    const dir = tmp();
    await runSweep({ config: small, outDir: dir, shard: { index: 1, count: 2 }, workers: 1 });
    expect(() => mergeShards([dir])).toThrow(/missing points 1, 3, 5, 7/);
    // The whole-grid shard plus shard 1/2 hold the points 0, 2, 4, 6 twice.
    expect(() => mergeShards([dir, join(wholeDir, 'shard-1-of-1.json')])).toThrow(/repeated points 0, 2, 4, 6 \(held by more than one of/);
    const other = tmp();
    await runSweep({ config: config({ chiN: [12] }), outDir: other, workers: 1 });
    expect(() => mergeShards([dir, other])).toThrow(/come from 2 different sweep configs/);
    expect(() => mergeShards([tmp()])).toThrow(/no shard files/);
  });

  it('a shard file of another config in --out is an error, and is left as it was', async () => {
    const path = join(wholeDir, 'shard-1-of-1.json');
    const before = readFileSync(path, 'utf8');
    await expect(runSweep({ config: config({ chiN: [12] }), outDir: wholeDir, workers: 1 })).rejects.toThrow(/holds shard 1\/1 of another sweep config/);
    expect(readFileSync(path, 'utf8')).toBe(before);
  });
});

describe('sweep against mean-field theory', () => {
  it('disordered below Leibler’s spinodal, lamellar above it, with the period near 2π/q*', async () => {
    // Leibler, Macromolecules 13, 1602 (1980): for f = 0.5 the mean-field transition is
    // continuous at χN = 10.495 with q*·Rg = 1.946, so the period there is 2π/1.946 Rg.
    const r = await runSweep({ config: config({ chiN: [10.2, 10.55, 11] }), outDir: tmp(), workers: 1 });
    const [below, just, above] = r.table!.points;
    expect(below.phase).toBe('disordered');
    expect(below.period).toBeNull();
    expect(below.freeEnergy).toBeCloseTo(10.2 * 0.25, 9);
    expect(just.phase).toBe('lamellar');
    expect(above.phase).toBe('lamellar');
    expect(Math.abs(just.period! / ((2 * Math.PI) / 1.946) - 1)).toBeLessThan(5e-3);
    // The period grows with χN above the transition (towards Semenov's (χN)^{1/6}).
    expect(above.period!).toBeGreaterThan(just.period!);
    expect(above.freeEnergyExcess!).toBeLessThan(0);
  });
});

it('the example config is a valid sweep', () => {
  const c = sweepConfigSchema.parse(JSON.parse(readFileSync('configs/sweep-chiN.sweep.json', 'utf8')));
  expect(sweepPoints(c)).toHaveLength(9);
});

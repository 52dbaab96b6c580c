/**
 * The files a sweep writes: one shard file per shard (kind "sweep-shard", saved after
 * every point so an interrupted shard resumes), the merged table (kind "sweep-table"),
 * and a CSV of the rows of either. Numbers are JSON numbers (float64 round-trip exact);
 * lengths in Rg, free energies in kT per chain.
 */
import { join } from 'node:path';
import { z } from 'zod';
import { writeFileAtomic } from '../io/atomic-write.js';
import type { SweepPointResult } from './solve-point.js';

const num = z.number();
const maybe = num.nullable();

export const pointResultSchema = z
  .object({
    index: z.number().int().min(0),
    chiN: num,
    f: num,
    segmentRatio: num,
    phase: z.string(),
    period: maybe,
    periodTolerance: maybe,
    freeEnergy: maybe,
    freeEnergyDisordered: maybe,
    freeEnergyExcess: maybe,
    Q: maybe,
    iterations: maybe,
    totalIterations: maybe,
    evaluations: z.number().int().min(0),
    residual: maybe,
    converged: z.boolean(),
    seconds: num,
    notes: z.array(z.string()),
  })
  .strict();

export const shardFileSchema = z
  .object({
    kind: z.literal('sweep-shard'),
    version: z.literal(1),
    provenance: z.record(z.string(), z.unknown()),
    configHash: z.string().regex(/^[0-9a-f]{64}$/),
    config: z.unknown(),
    shard: z.object({ index: z.number().int().min(1), count: z.number().int().min(1) }).strict(),
    totalPoints: z.number().int().min(1),
    /** Every point this shard is responsible for; `points` holds those finished so far. */
    indices: z.array(z.number().int().min(0)),
    complete: z.boolean(),
    points: z.array(pointResultSchema),
  })
  .strict();

export type ShardFile = z.infer<typeof shardFileSchema>;

export interface SweepTable {
  kind: 'sweep-table';
  version: 1;
  provenance: Record<string, unknown>;
  configHash: string;
  config: unknown;
  totalPoints: number;
  /** The shard files merged, with the provenance of each. */
  shards: { file: string; shard: ShardFile['shard']; provenance: Record<string, unknown> }[];
  points: SweepPointResult[];
}

const CSV_COLUMNS = [
  'index',
  'chiN',
  'f',
  'segmentRatio',
  'phase',
  'period',
  'freeEnergy',
  'freeEnergyDisordered',
  'freeEnergyExcess',
  'Q',
  'iterations',
  'totalIterations',
  'evaluations',
  'residual',
  'converged',
  'seconds',
] as const;

/** One row per point; String(number) is the shortest text that reads back to the same float64. */
export function pointsCsv(points: SweepPointResult[]): string {
  const rows = [CSV_COLUMNS.join(',')];
  for (const p of points) rows.push(CSV_COLUMNS.map((c) => (p[c] === null ? '' : String(p[c]))).join(','));
  return `${rows.join('\n')}\n`;
}

export function byIndex<T extends { index: number }>(points: T[]): T[] {
  return [...points].sort((a, b) => a.index - b.index);
}

/** Write sweep.json and sweep.csv into dir, each atomically; other files in dir (shards) stay. */
export function writeTable(dir: string, table: SweepTable): string[] {
  const paths = [join(dir, 'sweep.csv'), join(dir, 'sweep.json')];
  writeFileAtomic(paths[0], pointsCsv(table.points));
  writeFileAtomic(paths[1], `${JSON.stringify(table, null, 1)}\n`);
  return paths;
}

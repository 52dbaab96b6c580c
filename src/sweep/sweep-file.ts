/**
 * The files a sweep writes: one shard file per shard (kind "sweep-shard", saved after
 * every point so an interrupted shard resumes), the merged table (kind "sweep-table"),
 * and a CSV of the rows of either. Their schemas live in io/formats/sweep.ts. Numbers are JSON numbers (float64 round-trip exact);
 * lengths in Rg, free energies in kT per chain.
 */
import { join } from 'node:path';
import { writeFileAtomic } from '../io/atomic-write.js';
import type { SweepPointResult } from './solve-point.js';
import { formatText } from '../io/formats/file-format.js';
import { sweepTableSchema } from '../io/formats/sweep.js';
import type { SweepTable } from '../io/formats/sweep.js';

export { pointResultSchema, shardFileSchema, sweepTableSchema, SWEEP_FILE_VERSION } from '../io/formats/sweep.js';
export type { ShardFile, SweepTable } from '../io/formats/sweep.js';

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

/** The columns a film sweep adds after segmentRatio. */
const FILM_COLUMNS = ['thickness', 'affinityBottom', 'affinityTop', 'freeEnergyPerArea', 'layers'] as const;

/** One row per point; String(number) is the shortest text that reads back to the same float64. */
export function pointsCsv(points: SweepPointResult[]): string {
  const film = points.some((p) => p.thickness !== undefined);
  const columns: (keyof SweepPointResult)[] = film ? [...CSV_COLUMNS.slice(0, 4), ...FILM_COLUMNS, ...CSV_COLUMNS.slice(4)] : [...CSV_COLUMNS];
  const rows = [columns.join(',')];
  for (const p of points) rows.push(columns.map((c) => (p[c] === null || p[c] === undefined ? '' : String(p[c]))).join(','));
  return `${rows.join('\n')}\n`;
}

export function byIndex<T extends { index: number }>(points: T[]): T[] {
  return [...points].sort((a, b) => a.index - b.index);
}

/** The merged table's files, sweep.csv and sweep.json (written through its schema). */
export function tableFiles(table: SweepTable): Record<string, string> {
  return { 'sweep.csv': pointsCsv(table.points), 'sweep.json': formatText(sweepTableSchema, table) };
}

/** Write sweep.json and sweep.csv into dir, each atomically; other files in dir (shards) stay. */
export function writeTable(dir: string, table: SweepTable): string[] {
  const files = tableFiles(table);
  const paths = [join(dir, 'sweep.csv'), join(dir, 'sweep.json')];
  writeFileAtomic(paths[0], files['sweep.csv']);
  writeFileAtomic(paths[1], files['sweep.json']);
  return paths;
}

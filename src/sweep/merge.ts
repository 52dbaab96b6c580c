/**
 * Merge shard files into one table. They must come from one sweep config (same hash),
 * be complete, and together hold every point of the grid exactly once; otherwise the
 * error says which points are missing or repeated, and in which files.
 */
import { readdirSync, statSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { InputError } from '../io/errors.js';
import { loadJsonFile } from '../io/load-json.js';
import { provenance } from '../io/versions.js';
import { SHARD_FILE_PATTERN, formatIndices } from './shard.js';
import type { ShardFile, SweepTable } from './sweep-file.js';
import { byIndex, shardFileSchema, SWEEP_FILE_VERSION } from './sweep-file.js';

/** Each path is a directory (its shard-I-of-N.json files) or one shard file. */
export function findShardFiles(paths: string[]): string[] {
  const found = new Set<string>();
  for (const p of paths) {
    let isDir: boolean;
    try {
      isDir = statSync(p).isDirectory();
    } catch (e) {
      throw new InputError(`--merge: ${p}: cannot read it (${(e as NodeJS.ErrnoException).code ?? String(e)})`);
    }
    const files = isDir ? readdirSync(p).filter((n) => SHARD_FILE_PATTERN.test(n)).map((n) => join(p, n)) : [p];
    if (files.length === 0) throw new InputError(`--merge: ${p}: no shard files (shard-I-of-N.json) in this directory`);
    for (const f of files) found.add(resolve(f));
  }
  return [...found].sort();
}

export interface LoadedShard {
  path: string;
  data: ShardFile;
}

export function mergeShardFiles(files: LoadedShard[]): SweepTable {
  if (files.length === 0) throw new InputError('--merge: no shard files given');
  const byHash = new Map<string, string[]>();
  for (const f of files) byHash.set(f.data.configHash, [...(byHash.get(f.data.configHash) ?? []), f.path]);
  if (byHash.size > 1) {
    const groups = [...byHash].map(([h, ps]) => `config ${h.slice(0, 12)}…: ${ps.join(', ')}`);
    throw new InputError(`--merge: the shard files come from ${byHash.size} different sweep configs; merge one sweep at a time:\n  ${groups.join('\n  ')}`);
  }
  const partial = files.filter((f) => !f.data.complete);
  if (partial.length) {
    const list = partial.map((f) => `${f.path} (${f.data.points.length} of ${f.data.indices.length} points)`);
    throw new InputError(`--merge: unfinished shards (rerun the same shard to finish them): ${list.join(', ')}`);
  }
  const total = files[0].data.totalPoints;
  const holders = new Map<number, string[]>();
  for (const f of files) for (const p of f.data.points) holders.set(p.index, [...(holders.get(p.index) ?? []), f.path]);
  const missing: number[] = [];
  for (let i = 0; i < total; i++) if (!holders.has(i)) missing.push(i);
  const repeated = [...holders].filter(([, ps]) => ps.length > 1);
  const problems: string[] = [];
  if (missing.length) problems.push(`missing points ${formatIndices(missing)} (no shard file holds them: solve and add the shards they belong to)`);
  if (repeated.length) {
    const inFiles = [...new Set(repeated.flatMap(([, ps]) => ps))];
    problems.push(`repeated points ${formatIndices(repeated.map(([i]) => i))} (held by more than one of ${inFiles.join(', ')}: leave out the overlapping shard files)`);
  }
  if (problems.length) throw new InputError(`--merge: the shard files do not cover the ${total} grid points exactly once:\n  ${problems.join('\n  ')}`);
  return {
    kind: 'sweep-table',
    version: SWEEP_FILE_VERSION,
    provenance: { ...provenance() },
    configHash: files[0].data.configHash,
    config: files[0].data.config,
    totalPoints: total,
    shards: files.map((f) => ({ file: f.path, shard: f.data.shard, provenance: f.data.provenance })),
    points: byIndex(files.flatMap((f) => f.data.points)),
  };
}

export function mergeShards(paths: string[]): SweepTable {
  return mergeShardFiles(findShardFiles(paths).map((path) => ({ path, data: loadJsonFile(path, shardFileSchema) })));
}

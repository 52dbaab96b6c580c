/**
 * Shards: a deterministic split of the grid so a batch scheduler's array jobs can each
 * solve a part. Shard I of N (1-based, as array indices usually are) takes the points
 * with index % N == I − 1: interleaving spreads cheap and costly regions of the grid
 * evenly over the shards.
 */
import { InputError } from '../io/errors.js';

export interface ShardSpec {
  /** 1-based. */
  index: number;
  count: number;
}

export const WHOLE_GRID: ShardSpec = { index: 1, count: 1 };

export function parseShard(value: string | undefined): ShardSpec {
  if (value === undefined) return WHOLE_GRID;
  const m = /^\s*(\d+)\s*\/\s*(\d+)\s*$/.exec(value);
  const index = m ? Number(m[1]) : NaN;
  const count = m ? Number(m[2]) : NaN;
  if (!m || count < 1 || index < 1 || index > count) {
    throw new InputError(`--shard: got ${JSON.stringify(value)}; allowed: I/N with whole numbers 1 ≤ I ≤ N (for example 1/4, 2/4, 3/4, 4/4)`);
  }
  return { index, count };
}

export function shardIndices(totalPoints: number, shard: ShardSpec): number[] {
  const out: number[] = [];
  for (let i = shard.index - 1; i < totalPoints; i += shard.count) out.push(i);
  return out;
}

export function shardName(shard: ShardSpec): string {
  return `shard-${shard.index}-of-${shard.count}`;
}

export const SHARD_FILE_PATTERN = /^shard-(\d+)-of-(\d+)\.json$/;

/** "3, 5–9, 12": compact enough for an error message about thousands of points. */
export function formatIndices(indices: number[], limit = 20): string {
  const sorted = [...new Set(indices)].sort((a, b) => a - b);
  const runs: string[] = [];
  for (let i = 0; i < sorted.length; ) {
    let j = i;
    while (j + 1 < sorted.length && sorted[j + 1] === sorted[j] + 1) j++;
    runs.push(j > i ? `${sorted[i]}–${sorted[j]}` : String(sorted[i]));
    i = j + 1;
  }
  return runs.length > limit ? `${runs.slice(0, limit).join(', ')}, … (${sorted.length} in all)` : runs.join(', ');
}

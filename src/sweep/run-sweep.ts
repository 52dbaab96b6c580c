/**
 * Run one shard of a sweep (the whole grid when unsharded) into an output directory.
 *
 * The shard file is rewritten (atomically) after every point, so a run that stops
 * resumes from the points already saved; a shard already complete for the same config
 * is not solved again. An unsharded run also writes the merged table (sweep.json/.csv).
 */
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { writeFileAtomic } from '../io/atomic-write.js';
import { InputError } from '../io/errors.js';
import { loadJsonFile } from '../io/load-json.js';
import type { SweepConfig } from '../io/schemas/sweep-config.js';
import { provenance } from '../io/versions.js';
import { RunStopped } from '../runtime/stop.js';
import { PoolStopped } from '../threads/worker-pool.js';
import { configHash } from './config-hash.js';
import { sweepPoints } from './grid.js';
import { mergeShardFiles } from './merge.js';
import type { ShardSpec } from './shard.js';
import { WHOLE_GRID, shardIndices, shardName } from './shard.js';
import type { SweepPointResult } from './solve-point.js';
import type { ShardFile, SweepTable } from './sweep-file.js';
import { byIndex, pointsCsv, shardFileSchema, SWEEP_FILE_VERSION, writeTable } from './sweep-file.js';
import { throughSchema } from '../io/formats/file-format.js';
import { defaultWorkers } from '../io/worker-count.js';
import { solvePoints } from './solve-points.js';

export interface SweepProgress {
  /** Points of this shard finished, counting those saved by an earlier run. */
  done: number;
  total: number;
  /** Points solved by this run, and its seconds so far. */
  solved: number;
  seconds: number;
}

export interface SweepRunRequest {
  config: SweepConfig;
  outDir: string;
  shard?: ShardSpec;
  workers?: number;
  /** Called after each point is saved. */
  onPoint?: (r: SweepPointResult, p: SweepProgress) => void;
  /** Messages about what the run does (skip, resume); the CLI sends them to stderr. */
  log?: (message: string) => void;
}

export interface SweepRunResult {
  /** "skipped": already complete; "resumed": continued a partial shard; "ran": from the start. */
  status: 'skipped' | 'resumed' | 'ran';
  shardFile: string;
  shard: ShardFile;
  /** The merged table and its files, when the run covers the whole grid. */
  table?: SweepTable;
  written: string[];
  failed: SweepPointResult[];
}

export async function runSweep(req: SweepRunRequest): Promise<SweepRunResult> {
  const { config, outDir } = req;
  const shard = req.shard ?? WHOLE_GRID;
  const workers = req.workers ?? defaultWorkers();
  const log = req.log ?? (() => {});
  const hash = configHash(config);
  const points = sweepPoints(config);
  const indices = shardIndices(points.length, shard);
  const name = shardName(shard);
  const jsonPath = join(outDir, `${name}.json`);
  const csvPath = join(outDir, `${name}.csv`);

  const prev = existsSync(jsonPath) ? loadJsonFile(jsonPath, shardFileSchema) : undefined;
  let saved: SweepPointResult[] = [];
  let status: SweepRunResult['status'] = 'ran';
  if (prev) {
    if (prev.configHash !== hash) {
      throw new InputError(
        `--out: ${jsonPath} holds shard ${shard.index}/${shard.count} of another sweep config (hash ${prev.configHash.slice(0, 12)}…, this config ${hash.slice(0, 12)}…); give another --out directory, or remove the file to solve this shard again`,
      );
    }
    saved = prev.points;
    status = prev.complete ? 'skipped' : 'resumed';
  }

  const save = (complete: boolean): ShardFile => {
    const file: ShardFile = throughSchema(shardFileSchema, { kind: 'sweep-shard', version: SWEEP_FILE_VERSION, provenance: { ...provenance() }, configHash: hash, config, shard, totalPoints: points.length, indices, complete, points: byIndex(saved) });
    // The CSV first: the JSON is what a resume trusts, so it is the last to change.
    writeFileAtomic(csvPath, pointsCsv(file.points));
    writeFileAtomic(jsonPath, `${JSON.stringify(file, null, 1)}\n`);
    return file;
  };

  let file: ShardFile;
  if (prev && status === 'skipped') {
    log(`${name} of this config (hash ${hash.slice(0, 12)}…) is already complete in ${jsonPath} (${saved.length} points): skipped`);
    file = prev;
  } else {
    const done = new Set(saved.map((p) => p.index));
    const todo = indices.filter((i) => !done.has(i)).map((i) => points[i]);
    if (status === 'resumed') log(`resuming ${name} from ${jsonPath}: ${saved.length} of ${indices.length} points already saved, ${todo.length} to solve`);
    else save(false);
    const t0 = performance.now();
    let solved = 0;
    try {
      await solvePoints(config, todo, workers, (r) => {
        saved.push(r);
        solved++;
        save(false);
        req.onPoint?.(r, { done: saved.length, total: indices.length, solved, seconds: (performance.now() - t0) / 1000 });
      });
    } catch (e) {
      // Every solved point is already in the shard file (saved as it arrived): say so and how to go on.
      if (e instanceof PoolStopped) throw new RunStopped(`stopped after ${saved.length} of ${indices.length} points; they are saved in ${jsonPath}; run the same command again to solve the rest`);
      throw e;
    }
    file = save(true);
  }

  const written = [csvPath, jsonPath];
  let table: SweepTable | undefined;
  if (shard.count === 1) {
    table = mergeShardFiles([{ path: jsonPath, data: file }]);
    written.push(...writeTable(outDir, table));
  }
  return { status, shardFile: jsonPath, shard: file, table, written, failed: file.points.filter((p) => !p.converged) };
}

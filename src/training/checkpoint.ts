/**
 * Checkpoint directories. Layout:
 *   checkpoint.json  kind "checkpoint": config, provenance (backend, tfjs), step, stage,
 *                    loss weights, history, metrics, cell length, and the weight manifest
 *   weights.bin      all tensors in tfjs's own weight encoding (tf.io.encodeWeights):
 *                    the networks' parameters and the Adam moments
 * The directory is written whole to a temporary name and swapped in (io/atomic-write.ts),
 * so an interrupted save leaves the previous checkpoint intact.
 */
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { z } from 'zod';
import type * as TfModule from '@tensorflow/tfjs';
import { writeDirectoryAtomic } from '../io/atomic-write.js';
import { InputError } from '../io/errors.js';
import { formatZodError } from '../io/errors.js';
import { CHECKPOINT_VERSION, checkpointFileSchema, checkpointWrittenSchema } from '../io/formats/training.js';
import { throughSchema } from '../io/formats/file-format.js';
import type { CheckpointFile } from '../io/formats/training.js';
import type { Tf } from '../autodiff/tf.js';
import type { NamedWeight } from '../autodiff/parameters.js';

export { checkpointFileSchema, heldStateSchema, historyEntrySchema } from '../io/formats/training.js';
export type { CheckpointFile, HeldState, HistoryEntry } from '../io/formats/training.js';

export interface LoadedCheckpoint {
  file: CheckpointFile;
  weights: TfModule.NamedTensorMap;
}

export async function saveCheckpoint(tf: Tf, dir: string, meta: Omit<z.input<typeof checkpointWrittenSchema>, 'kind' | 'version' | 'weightSpecs' | 'weightBytes'>, tensors: NamedWeight[], extraFiles: Record<string, string> = {}): Promise<void> {
  await writeWeightsDirectory(tf, dir, checkpointWrittenSchema, { kind: 'checkpoint', version: CHECKPOINT_VERSION, ...meta }, tensors, extraFiles);
}

/**
 * A directory of `checkpoint.json` (meta plus the weight manifest) and `weights.bin`, written
 * whole and swapped in (the layout above; also used by other network kinds, e.g. surrogates).
 */
export async function writeWeightsDirectory<S extends z.ZodType>(tf: Tf, dir: string, schema: S, meta: Omit<z.input<S>, 'weightSpecs' | 'weightBytes'>, tensors: NamedWeight[], extraFiles: Record<string, string> = {}): Promise<void> {
  const { data, specs } = await tf.io.encodeWeights(tensors.map((t) => ({ name: t.name, tensor: t.tensor })));
  // Built through the file's schema: what is written always reads back.
  const file = throughSchema(schema, { ...meta, weightSpecs: specs, weightBytes: data.byteLength });
  writeDirectoryAtomic(dir, {
    'weights.bin': new Uint8Array(data),
    ...extraFiles,
    'checkpoint.json': `${JSON.stringify(file, null, 1)}\n`,
  });
}

/**
 * A transfer's source checkpoint exists (checked before the reference solve, so a missing one
 * fails at once); the message says how such a folder is made.
 */
export function requireTransferSource(dir: string): void {
  if (!existsSync(join(dir, 'checkpoint.json'))) {
    throw new InputError(`initFrom: ${dir}: not a checkpoint directory (no checkpoint.json); initFrom names the --out folder of a finished \`mesofield train\` run of the source system: train that one first`);
  }
}

/** Read and check a checkpoint; every problem is an InputError that says what is wrong. */
export function loadCheckpoint(tf: Tf, dir: string): LoadedCheckpoint {
  return readWeightsDirectory(tf, dir, checkpointFileSchema);
}

/** Read a directory written by writeWeightsDirectory and check it against `schema`; every problem is an InputError. */
export function readWeightsDirectory<S extends z.ZodType<{ weightSpecs: unknown[]; weightBytes: number }>>(tf: Tf, dir: string, schema: S): { file: z.infer<S>; weights: TfModule.NamedTensorMap } {
  const metaPath = join(dir, 'checkpoint.json');
  const binPath = join(dir, 'weights.bin');
  if (!existsSync(metaPath)) throw new InputError(`${dir}: not a checkpoint directory (no checkpoint.json)`);
  if (!existsSync(binPath)) throw new InputError(`${dir}: checkpoint is incomplete (no weights.bin)`);
  let raw: unknown;
  try {
    raw = JSON.parse(readFileSync(metaPath, 'utf8'));
  } catch (e) {
    throw new InputError(`${metaPath}: corrupted checkpoint (not valid JSON: ${(e as Error).message})`);
  }
  const parsed = schema.safeParse(raw);
  if (!parsed.success) throw new InputError(`${metaPath}: not a valid checkpoint\n${formatZodError(parsed.error, raw, metaPath)}`);
  const file = parsed.data;
  const buf = readFileSync(binPath);
  if (buf.byteLength !== file.weightBytes) {
    throw new InputError(`${binPath}: corrupted checkpoint: weights.bin has ${buf.byteLength} bytes, checkpoint.json says ${file.weightBytes}`);
  }
  const ab = buf.buffer.slice(buf.byteOffset, buf.byteOffset + buf.byteLength);
  let weights: TfModule.NamedTensorMap;
  try {
    weights = tf.io.decodeWeights(ab, file.weightSpecs as TfModule.io.WeightsManifestEntry[]);
  } catch (e) {
    throw new InputError(`${binPath}: corrupted checkpoint: cannot decode weights (${(e as Error).message})`);
  }
  for (const [name, t] of Object.entries(weights)) {
    const v = t.dataSync();
    for (let i = 0; i < v.length; i++) {
      if (!Number.isFinite(v[i])) throw new InputError(`${binPath}: corrupted checkpoint: weight ${name} holds a non-finite value`);
    }
  }
  return { file, weights };
}

/** Split decoded tensors into network parameters and Adam state. */
export function splitWeights(weights: TfModule.NamedTensorMap): { params: TfModule.NamedTensorMap; adam: TfModule.NamedTensorMap } {
  const params: TfModule.NamedTensorMap = {};
  const adam: TfModule.NamedTensorMap = {};
  for (const [k, t] of Object.entries(weights)) (k.startsWith('adam/') ? adam : params)[k] = t;
  return { params, adam };
}

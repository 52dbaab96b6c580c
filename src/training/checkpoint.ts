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
import { trainConfigSchema } from '../io/schemas/train-config.js';
import type { Tf } from '../autodiff/tf.js';
import type { NamedWeight } from '../autodiff/parameters.js';
import { LOSS_TERMS } from '../network/losses/terms.js';

const lossRecord = z.object(Object.fromEntries(LOSS_TERMS.map((k) => [k, z.number()])) as Record<(typeof LOSS_TERMS)[number], z.ZodNumber>);
// Balancing factors: a checkpoint written before a term existed has none for it; 1 is "unbalanced".
const factorRecord = z.object(Object.fromEntries(LOSS_TERMS.map((k) => [k, z.number().default(1)])) as Record<(typeof LOSS_TERMS)[number], z.ZodDefault<z.ZodNumber>>);

export const historyEntrySchema = z.object({
  step: z.number().int(),
  stage: z.enum(['warm-start', 'adam', 'lbfgs', 'second-order']),
  /** The loss of the stage's own objective (second-order: Σ r², the weighted terms of the whole system). */
  total: z.number(),
  terms: lossRecord.partial(),
  learningRate: z.number(),
  seconds: z.number(),
  phiError: z.number().optional(),
  /** L-BFGS entries: polish iterations done so far (the Adam step count stays in `step`). */
  lbfgsIterations: z.number().int().min(0).optional(),
  /** Second-order entries: Levenberg–Marquardt iterations done so far, and the damping μ after the iteration. */
  secondOrderIterations: z.number().int().min(0).optional(),
  damping: z.number().optional(),
  /** Seconds since the run started (reference solve and warm start included): the report's wall-time axis over every phase. */
  wallSeconds: z.number().optional(),
});

/** Which state the saved weights hold: where in the run, and its reference error when measured. */
export const heldStateSchema = z.object({
  stage: z.enum(['warm-start', 'adam', 'lbfgs', 'second-order']),
  step: z.number().int().min(0),
  lbfgsIterations: z.number().int().min(0).optional(),
  secondOrderIterations: z.number().int().min(0).optional(),
  phiError: z.number().optional(),
  /** Why this state: the lowest reference error measured, or the last state when none was measured. */
  chosenBy: z.enum(['lowest-reference-error', 'last']),
});

export const checkpointFileSchema = z.object({
  kind: z.literal('checkpoint'),
  version: z.literal(1),
  provenance: z.object({ tool: z.literal('mesofield'), version: z.string(), backend: z.string(), tfjs: z.string() }).passthrough(),
  config: trainConfigSchema,
  /** Cell length L in Rg the networks were built for (features depend on it). */
  length: z.number().gt(0),
  periods: z.number().int().min(1),
  step: z.number().int().min(0),
  stage: z.enum(['warm-start', 'adam', 'lbfgs', 'second-order', 'done']),
  /** The state the weights hold (final checkpoints): the best one kept, not necessarily the last. */
  holds: heldStateSchema.optional(),
  lossWeights: factorRecord,
  history: z.array(historyEntrySchema),
  metrics: z.record(z.string(), z.unknown()).optional(),
  /** The resampled MDE points in use at this step, so that a resumed run is exact. */
  extraPoints: z
    .object({ q: z.object({ x: z.array(z.number()), s: z.array(z.number()) }), qDagger: z.object({ x: z.array(z.number()), s: z.array(z.number()) }) })
    .nullable()
    .optional(),
  weightSpecs: z.array(z.object({ name: z.string(), shape: z.array(z.number().int()), dtype: z.string() }).passthrough()),
  weightBytes: z.number().int().min(0),
});

export type CheckpointFile = z.infer<typeof checkpointFileSchema>;
export type HistoryEntry = z.infer<typeof historyEntrySchema>;
export type HeldState = z.infer<typeof heldStateSchema>;

export interface LoadedCheckpoint {
  file: CheckpointFile;
  weights: TfModule.NamedTensorMap;
}

export async function saveCheckpoint(tf: Tf, dir: string, meta: Omit<CheckpointFile, 'kind' | 'version' | 'weightSpecs' | 'weightBytes'>, tensors: NamedWeight[], extraFiles: Record<string, string> = {}): Promise<void> {
  await writeWeightsDirectory(tf, dir, { kind: 'checkpoint', version: 1, ...meta }, tensors, extraFiles);
}

/**
 * A directory of `checkpoint.json` (meta plus the weight manifest) and `weights.bin`, written
 * whole and swapped in (the layout above; also used by other network kinds, e.g. surrogates).
 */
export async function writeWeightsDirectory(tf: Tf, dir: string, meta: Record<string, unknown>, tensors: NamedWeight[], extraFiles: Record<string, string> = {}): Promise<void> {
  const { data, specs } = await tf.io.encodeWeights(tensors.map((t) => ({ name: t.name, tensor: t.tensor })));
  const file = { ...meta, weightSpecs: specs, weightBytes: data.byteLength };
  // checkpoint.json last: it is what makes the directory a checkpoint (writeDirectoryAtomic renames in order).
  writeDirectoryAtomic(dir, {
    'weights.bin': new Uint8Array(data),
    ...extraFiles,
    'checkpoint.json': `${JSON.stringify(file, null, 1)}\n`,
  });
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

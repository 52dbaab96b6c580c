/**
 * Surrogate checkpoint directories, in the layout of training/checkpoint.ts:
 *   checkpoint.json  kind "surrogate-checkpoint": config, provenance (backend, tfjs), the
 *                    period model (anchor values and periods), the anchors' results, the
 *                    training history, the metrics with the error map, the weight manifest
 *   weights.bin      the field network's parameters (tfjs weight encoding)
 *   metrics.json     the metrics again, on their own
 *   reference.json, network.json  the worst held-out point: the reference solution and the
 *                    surrogate on the reference's cell (t = x/L), for the report's profile pages
 * Written whole and swapped in (io/atomic-write.ts).
 */
import { z } from 'zod';
import { surrogateConfigSchema } from '../io/schemas/surrogate-config.js';
import type { Tf } from '../autodiff/tf.js';
import { readWeightsDirectory, writeWeightsDirectory } from '../training/checkpoint.js';
import { InputError } from '../io/errors.js';
import { SurrogateModel } from './surrogate-model.js';

const pointSchema = z.object({ chiN: z.number(), f: z.number(), segmentRatio: z.number() });

export const surrogateHistorySchema = z.object({
  /** 0: the fit to the reference data; k ≥ 1: physics round k. */
  round: z.number().int().min(0),
  /** Largest SCFT residual max |d| (kT) over the round's points before its update (NaN for the fit). */
  residual: z.number().nullable(),
  fitLoss: z.number(),
  seconds: z.number(),
  /** Largest held-out φ_A relative L2 error, when evaluated. */
  phiError: z.number().optional(),
});

export const surrogateCheckpointSchema = z.object({
  kind: z.literal('surrogate-checkpoint'),
  version: z.literal(1),
  provenance: z.object({ tool: z.literal('mesofield'), version: z.string(), backend: z.string(), tfjs: z.string() }).passthrough(),
  config: surrogateConfigSchema,
  periodModel: z.object({ axes: z.array(z.array(z.number())), periods: z.array(z.number().gt(0)) }),
  anchors: z.array(z.object({ point: pointSchema, period: z.number(), freeEnergy: z.number() })),
  history: z.array(surrogateHistorySchema),
  metrics: z.record(z.string(), z.unknown()).optional(),
  weightSpecs: z.array(z.object({ name: z.string(), shape: z.array(z.number().int()), dtype: z.string() }).passthrough()),
  weightBytes: z.number().int().min(0),
});

export type SurrogateCheckpointFile = z.infer<typeof surrogateCheckpointSchema>;
export type SurrogateHistoryEntry = z.infer<typeof surrogateHistorySchema>;

export async function saveSurrogate(tf: Tf, dir: string, meta: Omit<SurrogateCheckpointFile, 'kind' | 'version' | 'weightSpecs' | 'weightBytes'>, model: SurrogateModel, extraFiles: Record<string, string>): Promise<void> {
  await writeWeightsDirectory(tf, dir, { kind: 'surrogate-checkpoint', version: 1, ...meta }, model.parameters.namedWeights(), extraFiles);
}

/** The surrogate of a checkpoint directory, rebuilt with its saved weights. */
export function loadSurrogate(tf: Tf, dir: string): { file: SurrogateCheckpointFile; model: SurrogateModel } {
  const { file, weights } = readWeightsDirectory(tf, dir, surrogateCheckpointSchema);
  const model = new SurrogateModel(tf, file.config, file.periodModel);
  try {
    model.parameters.loadNamedWeights(weights);
  } catch (e) {
    model.dispose();
    throw new InputError(`${dir}: checkpoint does not match its own config: ${(e as Error).message}`);
  } finally {
    for (const t of Object.values(weights)) t.dispose();
  }
  return { file, model };
}

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
import type { z } from 'zod';
import { SURROGATE_CHECKPOINT_VERSION, surrogateCheckpointSchema } from '../io/formats/surrogate.js';
import type { SurrogateCheckpointFile } from '../io/formats/surrogate.js';
import type { Tf } from '../autodiff/tf.js';
import { readWeightsDirectory, writeWeightsDirectory } from '../training/checkpoint.js';
import { InputError } from '../io/errors.js';
import { SurrogateModel } from './surrogate-model.js';

export { surrogateCheckpointSchema, surrogateHistorySchema } from '../io/formats/surrogate.js';
export type { SurrogateCheckpointFile, SurrogateHistoryEntry } from '../io/formats/surrogate.js';

export async function saveSurrogate(tf: Tf, dir: string, meta: Omit<z.input<typeof surrogateCheckpointSchema>, 'kind' | 'version' | 'weightSpecs' | 'weightBytes'>, model: SurrogateModel, extraFiles: Record<string, string>): Promise<void> {
  await writeWeightsDirectory(tf, dir, surrogateCheckpointSchema, { kind: 'surrogate-checkpoint', version: SURROGATE_CHECKPOINT_VERSION, ...meta }, model.parameters.namedWeights(), extraFiles);
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

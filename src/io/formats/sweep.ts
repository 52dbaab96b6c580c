/**
 * The files of a sweep (version 2): one shard file per shard (kind "sweep-shard", saved after
 * every point so an interrupted shard resumes) and the merged table (kind "sweep-table").
 * One row per point; lengths in Rg, free energies in kT per chain; null where a point has no
 * such number (no period when disordered, nothing when the solve failed).
 */
import { z } from 'zod';
import { sweepConfigSchema } from '../schemas/sweep-config.js';
import { formatHeader, provenanceSchema } from './file-format.js';

export const SWEEP_FILE_VERSION = 2;

const num = z.number();
const maybe = num.nullable();

export const pointResultSchema = z
  .object({
    index: z.number().int().min(0),
    chiN: num,
    f: num,
    segmentRatio: num,
    /** A film sweep only: thickness H (Rg), the walls' affinities for A, F per area (kT ρ₀Rg/N) and the layers from the bottom wall ('' when failed). */
    thickness: num.optional(),
    affinityBottom: num.optional(),
    affinityTop: num.optional(),
    freeEnergyPerArea: maybe.optional(),
    layers: z.string().optional(),
    /** "lamellar", "disordered", or "failed" when the solve threw. */
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

const shardSchema = z.object({ index: z.number().int().min(1), count: z.number().int().min(1) }).strict();

export const shardFileSchema = z
  .object({
    ...formatHeader('sweep-shard', SWEEP_FILE_VERSION),
    provenance: provenanceSchema,
    configHash: z.string().regex(/^[0-9a-f]{64}$/),
    config: sweepConfigSchema,
    shard: shardSchema,
    totalPoints: z.number().int().min(1),
    /** Every point this shard is responsible for; `points` holds those finished so far. */
    indices: z.array(z.number().int().min(0)),
    complete: z.boolean(),
    points: z.array(pointResultSchema),
  })
  .strict();

export type ShardFile = z.infer<typeof shardFileSchema>;

export const sweepTableSchema = z
  .object({
    ...formatHeader('sweep-table', SWEEP_FILE_VERSION),
    provenance: provenanceSchema,
    configHash: z.string().regex(/^[0-9a-f]{64}$/),
    config: sweepConfigSchema,
    totalPoints: z.number().int().min(1),
    /** The shard files merged, with the provenance of each. */
    shards: z.array(z.object({ file: z.string(), shard: shardSchema, provenance: provenanceSchema }).strict()),
    points: z.array(pointResultSchema),
  })
  .strict();

export type SweepTable = z.infer<typeof sweepTableSchema>;

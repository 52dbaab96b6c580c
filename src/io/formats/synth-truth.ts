/**
 * File kind "synth-truth" (version 2): what `synth` used to make a synthetic profile, written
 * beside it so that `invert` can measure its estimates against the truth. Lengths (period,
 * offset, resolution) in Rg; the profile's x column is in `xUnits`.
 */
import { z } from 'zod';
import { chainSchema } from '../../physics/chain-schema.js';
import { formatHeader, provenanceSchema } from './file-format.js';

export const SYNTH_TRUTH_VERSION = 2;

export const synthTruthSchema = z
  .object({
    ...formatHeader('synth-truth', SYNTH_TRUTH_VERSION),
    provenance: provenanceSchema,
    chain: chainSchema,
    f: z.number().gt(0).lt(1),
    chiN: z.number().gt(0),
    /** Lamellar period of the synthetic profile (Rg). */
    period: z.number().gt(0),
    periodMode: z.enum(['equilibrium', 'given']),
    /** Data position (Rg) of the centre of an A-rich domain. */
    offset: z.number(),
    points: z.number().int().min(1),
    periods: z.number().gt(0),
    /** Standard deviation of the added Gaussian noise (in φA). */
    noise: z.number().min(0),
    seed: z.number().int(),
    /** Gaussian instrument resolution (standard deviation, Rg); 0 for none. */
    resolution: z.number().min(0),
    nx: z.number().int(),
    ns: z.number().int(),
    xUnits: z.enum(['Rg', 'nm']),
    rgNm: z.number().gt(0).optional(),
    freeEnergy: z.number(),
    note: z.string(),
  })
  .strict();

export type SynthTruth = z.infer<typeof synthTruthSchema>;

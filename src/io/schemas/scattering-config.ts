/**
 * Config file kind "fit-scattering": χN of a disordered melt from small-angle scattering
 * I(q), one file or a temperature series. Command-line flags override the file. Rg is free
 * without units.rgNm, fixed with it, and constrained (a Gaussian of that standard
 * deviation) with units.rgNmSd as well. units.segments is N, which turns χN into χ.
 */
import { z } from 'zod';
import { chainSchema } from '../../physics/chain-schema.js';

const positive = z.number().gt(0);

export const scatteringConfigSchema = z
  .object({
    version: z.literal(2),
    kind: z.literal('fit-scattering'),
    system: z.object({ chain: chainSchema }).strict(),
    units: z
      .object({ rgNm: positive.optional(), rgNmSd: positive.optional(), segments: positive.optional(), segmentLengthNm: positive.optional() })
      .strict()
      .prefault({}),
    /** Gaussian q resolution (standard deviation) in the units of the files' q column; 0 for none. */
    resolution: z.number().min(0).default(0),
    /** χN search range [lo, hi]; default [−(χN)_s, (χN)_s]. */
    chiNRange: z
      .tuple([z.number(), z.number()])
      .refine((r) => r[0] < r[1], { message: 'must be [lo, hi] with lo < hi' })
      .optional(),
    /** The data: CSV paths (relative to the config file) and, for a series, each file's temperature in K. */
    files: z.array(z.object({ file: z.string().min(1), temperature: positive.optional() }).strict()).min(1, 'give at least one file'),
    /** Invariant degree of polymerisation N̄ (for the Fredrickson–Helfand estimate). */
    nbar: positive.optional(),
    /** Extra points on the profile-likelihood curve (for reports). */
    profilePoints: z.number().int().min(0).max(100).default(15),
  })
  .strict();

export type ScatteringConfig = z.infer<typeof scatteringConfigSchema>;

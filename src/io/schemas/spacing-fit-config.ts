/**
 * Config file kind "fit-spacing": χ and the statistical segment length b from the lamellar
 * period D measured for several chain lengths N (the CSV is the command's argument).
 * Command-line flags override the file. χ is per reference segment; b in nm.
 */
import { z } from 'zod';
import { chainSchema } from '../../physics/chain-schema.js';
import { configVersionSchema } from './config-version.js';
import { contourStepsSchema, gridPointsSchema, spectralSchema } from './spectral-schema.js';

const positive = z.number().gt(0);

export const spacingFitConfigSchema = z
  .object({
    version: configVersionSchema,
    kind: z.literal('fit-spacing'),
    /** The chain of known architecture (the same f and b_A/b_B for every N); χ is the unknown. */
    system: z.object({ chain: chainSchema }).strict(),
    /** The model lamella at its stress-free period: nx grid points, ns contour steps. */
    cell: z.object({ nx: gridPointsSchema.default(64), ns: contourStepsSchema.default(100) }).strict().prefault({}),
    solver: spectralSchema.pick({ tolerance: true, maxIterations: true, andersonHistory: true, andersonMixing: true }).prefault({}),
    /** Search range of χ [lo, hi]; default from 1.05 × the spinodal at the smallest N to χN = 60 at the largest. */
    chiRange: z
      .tuple([positive, positive])
      .refine((r) => r[0] < r[1], { message: 'must be [lo, hi] with lo < hi' })
      .meta({ constraint: 'lo < hi' })
      .optional(),
  })
  .strict();

export type SpacingFitConfig = z.infer<typeof spacingFitConfigSchema>;

/**
 * Config file kind "fit-bragg": χN (and the period D) of an ordered lamellar sample from its
 * measured Bragg peaks (the CSV is the command's argument). Command-line flags override the
 * file. Without units.rgNm, D is fitted freely from the positions and χN comes from the
 * relative intensities alone; with it, D is tied to Rg·L_eq(χN) (units.rgNmSd: Rg's standard
 * deviation, profiled out under a Gaussian constraint).
 */
import { z } from 'zod';
import { chainSchema } from '../../physics/chain-schema.js';
import { configVersionSchema } from './config-version.js';
import { contourStepsSchema, gridPointsSchema, spectralSchema } from './spectral-schema.js';

const positive = z.number().gt(0);

export const braggFitConfigSchema = z
  .object({
    version: configVersionSchema,
    kind: z.literal('fit-bragg'),
    /** The chain of known architecture; χN is the unknown. */
    system: z.object({ chain: chainSchema }).strict(),
    /** The model lamella at its stress-free period: nx grid points, ns contour steps. */
    cell: z.object({ nx: gridPointsSchema.default(64), ns: contourStepsSchema.default(100) }).strict().prefault({}),
    solver: spectralSchema.pick({ tolerance: true, maxIterations: true, andersonHistory: true, andersonMixing: true }).prefault({}),
    /** Search range of χN [lo, hi]; default [1.01 (χN)_spinodal, 60]. */
    chiNRange: z
      .tuple([positive, positive])
      .refine((r) => r[0] < r[1], { message: 'must be [lo, hi] with lo < hi' })
      .meta({ constraint: 'lo < hi' })
      .optional(),
    /** The measured intensities carry the powder Lorentz factor 1/q². */
    lorentz: z.boolean().default(false),
    /** Rg in nm ties D to Rg·L_eq(χN); rgNmSd is its standard deviation in nm. */
    units: z
      .object({ rgNm: positive.optional(), rgNmSd: positive.optional() })
      .strict()
      .refine((u) => u.rgNmSd === undefined || u.rgNm !== undefined, { message: 'rgNmSd needs rgNm (the Rg it is the uncertainty of)', path: ['rgNmSd'] })
      .prefault({}),
  })
  .strict();

export type BraggFitConfig = z.infer<typeof braggFitConfigSchema>;

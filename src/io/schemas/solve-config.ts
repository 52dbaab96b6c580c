/** Config file kind "solve": one reference SCFT solve. */
import { z } from 'zod';
import { systemSchema } from '../../physics/chain-schema.js';
import { configVersionSchema } from './config-version.js';
import { cellSchema, spectralSchema } from './spectral-schema.js';

export const solveConfigSchema = z
  .object({
    version: configVersionSchema,
    kind: z.literal('solve'),
    system: systemSchema,
    cell: cellSchema.prefault({}),
    solver: spectralSchema.default(spectralSchema.parse({})),
    output: z
      .object({
        /** Also write q(x, s) and q†(x, s) on the full contour grid. */
        propagators: z.boolean().default(false),
      })
      .strict()
      .default({ propagators: false }),
  })
  .strict();

export type SolveConfig = z.infer<typeof solveConfigSchema>;
export type SolveConfigInput = z.input<typeof solveConfigSchema>;

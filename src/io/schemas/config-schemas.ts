/** Every config kind and its schema: the one list the schema command, the docs and the tests walk. */
import type { z } from 'zod';
import { braggFitConfigSchema } from './bragg-fit-config.js';
import { filmFitConfigSchema } from './film-fit-config.js';
import { invertConfigSchema } from './invert-config.js';
import { spacingFitConfigSchema } from './spacing-fit-config.js';
import { solveConfigSchema } from './solve-config.js';
import { surrogateConfigSchema } from './surrogate-config.js';
import { sweepConfigSchema } from './sweep-config.js';
import { trainConfigSchema } from './train-config.js';

export const CONFIG_SCHEMAS: Record<string, z.ZodType> = {
  solve: solveConfigSchema,
  train: trainConfigSchema,
  invert: invertConfigSchema,
  sweep: sweepConfigSchema,
  surrogate: surrogateConfigSchema,
  'film-fit': filmFitConfigSchema,
  'fit-bragg': braggFitConfigSchema,
  'fit-spacing': spacingFitConfigSchema,
};

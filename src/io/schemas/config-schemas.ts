/**
 * Every config kind and its schema, all built (the list itself is config-schema-loaders.ts,
 * whose kinds load on demand): for the docs generator and the tests that walk every kind.
 */
import type { z } from 'zod';
import { loadConfigSchemas } from './config-schema-loaders.js';

export const CONFIG_SCHEMAS: Record<string, z.ZodType> = await loadConfigSchemas();

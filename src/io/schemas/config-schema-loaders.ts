/**
 * Every config kind and the module of its schema: the one list the schema command, the docs
 * and the tests walk. Each schema loads on demand: building a kind's zod schema costs start-up
 * time, and `mesofield schema solve` needs one kind, not all (config-schemas.ts loads them all).
 */
import type { z } from 'zod';

/**
 * A kind's schema as the common schema type. Checked only for being a zod schema (its `_zod`
 * member): tsc's structural check that a kind's full schema type is assignable to z.ZodType
 * made this file a tenth of the whole type check (measured with --generateTrace).
 */
const asSchema = (schema: { readonly _zod: unknown }): z.ZodType => schema as unknown as z.ZodType;

export const CONFIG_SCHEMA_LOADERS: Record<string, () => Promise<z.ZodType>> = {
  solve: async () => asSchema((await import('./solve-config.js')).solveConfigSchema),
  train: async () => asSchema((await import('./train-config.js')).trainConfigSchema),
  invert: async () => asSchema((await import('./invert-config.js')).invertConfigSchema),
  sweep: async () => asSchema((await import('./sweep-config.js')).sweepConfigSchema),
  surrogate: async () => asSchema((await import('./surrogate-config.js')).surrogateConfigSchema),
  'film-fit': async () => asSchema((await import('./film-fit-config.js')).filmFitConfigSchema),
  'fit-bragg': async () => asSchema((await import('./bragg-fit-config.js')).braggFitConfigSchema),
  'fit-spacing': async () => asSchema((await import('./spacing-fit-config.js')).spacingFitConfigSchema),
};

/** Folder of the build's JSON Schema texts, relative to dist/ (config-json-schema.ts): the build writes there, `schema KIND` reads there. */
export const BUILT_SCHEMA_FOLDER = 'config-schemas';

/** The kind names, in the order of the list. */
export const CONFIG_KIND_NAMES: readonly string[] = Object.keys(CONFIG_SCHEMA_LOADERS);

/** Every kind's schema, by name, in the order of the list. */
export async function loadConfigSchemas(): Promise<Record<string, z.ZodType>> {
  const schemas = await Promise.all(CONFIG_KIND_NAMES.map((k) => CONFIG_SCHEMA_LOADERS[k]()));
  return Object.fromEntries(CONFIG_KIND_NAMES.map((k, i) => [k, schemas[i]]));
}

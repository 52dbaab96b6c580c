/**
 * What every file the tool writes shares: a `kind`, a `version` and its provenance, and the
 * rule that a file is written and read through its one zod schema (src/io/formats/*). A file
 * of another version is refused with a message that says so, never half-read.
 */
import { z } from 'zod';
import { loadJsonFile } from '../load-json.js';

/** The `kind` and `version` fields of a file kind; a file of another version gets a clear message. */
export function formatHeader<K extends string, V extends number>(kind: K, version: V) {
  return {
    kind: z.literal(kind),
    version: z.literal(version, {
      error: `this version of mesofield reads "${kind}" files of version ${version}; the file was written by another version: run the command that wrote it again`,
    }),
  };
}

/** Provenance of a written file (io/versions.ts): what made it. */
export const provenanceSchema = z
  .object({
    tool: z.literal('mesofield'),
    version: z.string(),
    node: z.string(),
    createdAt: z.string(),
    backend: z.string().optional(),
    tfjs: z.string().optional(),
  })
  .strict();

/**
 * A value as it will be written, checked by its schema: JSON has no NaN or Infinity (they
 * become null), so the check runs on the JSON form, which is exactly what a reader will see.
 */
export function throughSchema<S extends z.ZodType>(schema: S, value: unknown): z.infer<S> {
  return schema.parse(JSON.parse(JSON.stringify(value)));
}

/**
 * The JSON text of a file, built through its schema: the value is validated (and its
 * defaults filled) before it is written, so a file the tool writes always reads back.
 */
export function formatText<S extends z.ZodType>(schema: S, value: z.input<S>, indent = 1): string {
  return `${JSON.stringify(throughSchema(schema, value), null, indent)}\n`;
}

/** Read a file of a known kind through its schema (errors name the file and field). */
export function readFormat<S extends z.ZodType>(path: string, schema: S): z.infer<S> {
  return loadJsonFile(path, schema);
}

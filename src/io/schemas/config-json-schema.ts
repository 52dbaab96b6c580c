/**
 * The JSON Schema of a config kind, generated from the zod schema the tool validates with (the
 * input side: fields with defaults are optional), so the reference cannot drift from the code.
 *
 * Start-up: `npm run build` writes each kind's text into dist/config-schemas/KIND.json
 * (scripts/build.mjs), and `mesofield schema KIND` prints that file without loading zod or
 * building a schema; without the file (a plain tsc build) the command generates the same text
 * here. A test holds the built files equal to what this function makes.
 */
import { z } from 'zod';
import { CONFIG_SCHEMA_LOADERS } from './config-schema-loaders.js';

/** The JSON Schema of `kind` as the text `mesofield schema KIND` prints (indented, one final newline). */
export async function configJsonSchemaText(kind: string): Promise<string> {
  const schema = await CONFIG_SCHEMA_LOADERS[kind]();
  return `${JSON.stringify(z.toJSONSchema(schema, { io: 'input', unrepresentable: 'any' }), null, 2)}\n`;
}

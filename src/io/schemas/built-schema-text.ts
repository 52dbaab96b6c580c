/**
 * The build's text of a config kind's JSON Schema (dist/config-schemas/KIND.json, written by
 * scripts/build.mjs through config-json-schema.ts): what `mesofield schema KIND` prints, read
 * without zod or the kind's schema. Used by the command and by its quick path (cli/quick-answer.ts).
 */
import { readFileSync, statSync } from 'node:fs';
import { BUILT_SCHEMA_FOLDER } from './config-schema-loaders.js';

/**
 * The text, or null without it. A file older than the compiled schema list is stale (a plain
 * tsc ran after the build, and tsc rewrites every file it emits): then the schema is generated instead.
 * `dist` is the folder of the built program (this file sits two levels below it).
 */
export function builtSchemaText(kind: string, dist = new URL('../../', import.meta.url)): string | null {
  try {
    const file = new URL(`${BUILT_SCHEMA_FOLDER}/${kind}.json`, dist);
    const compiled = new URL('io/schemas/config-schema-loaders.js', dist);
    if (statSync(file).mtimeMs < statSync(compiled).mtimeMs) return null;
    return readFileSync(file, 'utf8');
  } catch {
    return null;
  }
}

import { readFileSync } from 'node:fs';
import type { z } from 'zod';
import { InputError, parseOrThrow } from './errors.js';

/** Read a JSON file and validate it; all problems become InputErrors naming the file. */
export function loadJsonFile<S extends z.ZodType>(path: string, schema: S): z.infer<S> {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch (e) {
    throw new InputError(`${path}: cannot read the file (${(e as NodeJS.ErrnoException).code ?? String(e)})`);
  }
  let data: unknown;
  try {
    data = JSON.parse(text);
  } catch (e) {
    throw new InputError(`${path}: not valid JSON (${(e as Error).message})`);
  }
  return parseOrThrow(schema, data, path);
}

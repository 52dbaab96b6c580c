import { readFileSync } from 'node:fs';
import type { z } from 'zod';
import { InputError, parseOrThrow } from './errors.js';

/** Read a JSON file; unreadable files and bad JSON become InputErrors naming the file. */
export function readJsonFile(path: string): unknown {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch (e) {
    throw new InputError(`${path}: cannot read the file (${(e as NodeJS.ErrnoException).code ?? String(e)})`);
  }
  try {
    return JSON.parse(text);
  } catch (e) {
    throw new InputError(`${path}: not valid JSON (${(e as Error).message})`);
  }
}

/** Read a JSON file and validate it; all problems become InputErrors naming the file. */
export function loadJsonFile<S extends z.ZodType>(path: string, schema: S): z.infer<S> {
  return parseOrThrow(schema, readJsonFile(path), path);
}

/** A config file read as plain JSON, for commands that apply flags on top before validating. */
import { readFileSync } from 'node:fs';
import { InputError } from '../io/errors.js';

export function readRawConfig(path: string): Record<string, unknown> {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch (e) {
    throw new InputError(`${path}: cannot read the file (${(e as NodeJS.ErrnoException).code ?? String(e)})`);
  }
  try {
    return JSON.parse(text) as Record<string, unknown>;
  } catch (e) {
    throw new InputError(`${path}: not valid JSON (${(e as Error).message})`);
  }
}

/** The object at parent[key], created empty when missing or not an object. */
export function obj(parent: Record<string, unknown>, key: string): Record<string, unknown> {
  const v = parent[key];
  if (v && typeof v === 'object' && !Array.isArray(v)) return v as Record<string, unknown>;
  const fresh: Record<string, unknown> = {};
  parent[key] = fresh;
  return fresh;
}

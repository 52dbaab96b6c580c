import type { z } from 'zod';
import { InputError, parseOrThrow } from './errors.js';
import { readInputText } from './fs-errors.js';

/**
 * Number literals that JSON.parse would silently change: 1e999 becomes Infinity and 1e-400
 * becomes 0. Returns a message naming the first one (with its line), or null. Strings are
 * skipped so a number inside one is not mistaken for a value.
 */
function unrepresentableNumber(text: string): string | null {
  const num = /-?(?:0|[1-9]\d*)(?:\.\d+)?(?:[eE][+-]?\d+)?/y;
  for (let i = 0; i < text.length; i++) {
    const c = text[i];
    if (c === '"') {
      for (i++; i < text.length && text[i] !== '"'; i++) if (text[i] === '\\') i++;
      continue;
    }
    if (c !== '-' && !(c >= '0' && c <= '9')) continue;
    num.lastIndex = i;
    const m = num.exec(text);
    if (!m) continue;
    const literal = m[0];
    const v = Number(literal);
    // The line is counted only for a message: counting it for every number made reading a
    // solution file of a few hundred kB take seconds (quadratic in the file's length).
    const line = () => text.slice(0, i).split('\n').length;
    if (!Number.isFinite(v)) return `line ${line()}: the number ${literal} is beyond the range of a double (it would read as Infinity); allowed: finite numbers`;
    if (v === 0 && /[1-9]/.test(literal.replace(/[eE].*$/, ''))) return `line ${line()}: the number ${literal} is too small to represent (it would read as 0); allowed: numbers ≥ 1e-300 in size, or 0`;
    i += literal.length - 1;
  }
  return null;
}

/**
 * Read a JSON file; unreadable files and bad JSON become InputErrors naming the file. A
 * byte-order mark (as some editors write) is skipped, as the CSV reader does.
 */
export function readJsonFile(path: string): unknown {
  let text = readInputText(path);
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  if (text.trim() === '') throw new InputError(`${path}: the file is empty; allowed: a JSON object (see mesofield schema KIND)`);
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch (e) {
    throw new InputError(`${path}: not valid JSON (${(e as Error).message})`);
  }
  const bad = unrepresentableNumber(text);
  if (bad) throw new InputError(`${path}: ${bad}`);
  return value;
}

/** The kind of JSON value, in words, for messages. */
export function jsonKind(v: unknown): string {
  if (v === null) return 'null';
  if (Array.isArray(v)) return 'an array';
  return typeof v === 'object' ? 'an object' : `a ${typeof v} (${JSON.stringify(v)})`;
}

/** Read a JSON file whose top level must be an object (every config kind). */
export function readJsonObject(path: string): Record<string, unknown> {
  const v = readJsonFile(path);
  if (v === null || typeof v !== 'object' || Array.isArray(v)) {
    throw new InputError(`${path}: (top level): got ${jsonKind(v)}; allowed: a JSON object such as {"version": …, "kind": …} (see mesofield schema KIND)`);
  }
  return v as Record<string, unknown>;
}

/** Read a JSON file and validate it; all problems become InputErrors naming the file. */
export function loadJsonFile<S extends z.ZodType>(path: string, schema: S): z.infer<S> {
  return parseOrThrow(schema, readJsonObject(path), path);
}

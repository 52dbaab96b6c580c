/**
 * User-facing errors. Every bad input names the field, the value received and what is
 * allowed; the CLI maps these to exit code 2 (bad input) or 3 (a run that failed).
 */
import type { z } from 'zod';
import { ModelError } from '../physics/chain.js';
import { formatValue } from './number-format.js';
import { version1Message } from './config-renames.js';

export class InputError extends Error {
  readonly exitCode = 2;
  constructor(message: string) {
    super(message);
    this.name = 'InputError';
  }
}

export class RunFailure extends Error {
  readonly exitCode = 3;
  constructor(message: string) {
    super(message);
    this.name = 'RunFailure';
  }
}

/** A value as a message shows it (non-finite numbers by name: JSON would print them as null). */
export function describeValue(v: unknown): string {
  if (v === undefined) return 'nothing (missing)';
  // A long list is described by its length (what a check on it is about), not its contents.
  if (Array.isArray(v) && v.length > 8) return `${v.length} values`;
  const s = formatValue(v);
  return s.length > 80 ? `${s.slice(0, 77)}...` : s;
}

function valueAt(root: unknown, path: PropertyKey[]): unknown {
  let cur: unknown = root;
  for (const key of path) {
    if (cur === null || typeof cur !== 'object') return undefined;
    cur = (cur as Record<PropertyKey, unknown>)[key];
  }
  return cur;
}

/**
 * What an issue allows, in words. A union's own message is only "Invalid input": spell out
 * each alternative and where it failed (e.g. `a number (got a string), or "optimize"`).
 */
export function issueMessage(issue: z.core.$ZodIssue): string {
  if (issue.code !== 'invalid_union' || !('errors' in issue) || !Array.isArray(issue.errors) || issue.errors.length === 0) return issue.message;
  const alternative = (i: z.core.$ZodIssue): string => {
    const where = i.path.length ? `${i.path.map((k) => (typeof k === 'number' ? `item ${k}` : String(k))).join('.')}: ` : '';
    if (i.code === 'invalid_type') return `${where}${i.expected === 'int' ? 'a whole number' : `${/^[aeiou]/.test(i.expected) ? 'an' : 'a'} ${i.expected}`}`;
    if (i.code === 'invalid_value') return `${where}${i.values.map((v) => JSON.stringify(v)).join(' or ')}`;
    return `${where}${i.message.replace(/^Invalid (input|option): (expected )?/, '')}`;
  };
  const branches = (issue.errors as z.core.$ZodIssue[][]).map((branch) => branch.map(alternative).join(' and '));
  return `allowed: ${branches.join(', or ')}`;
}

/** One line per zod issue: "<file>: <path>: got <value>; <what is allowed>". */
export function formatZodError(error: z.ZodError, input: unknown, source: string): string {
  const lines = error.issues.map((issue) => {
    const path = issue.path.length ? issue.path.map(String).join('.') : '(top level)';
    if (issue.code === 'unrecognized_keys') {
      return `${source}: ${path}: unknown field(s) ${issue.keys.map((k) => JSON.stringify(k)).join(', ')}; remove them (check the spelling)`;
    }
    return `${source}: ${path}: got ${describeValue(valueAt(input, issue.path))}; ${issueMessage(issue)}`;
  });
  return lines.join('\n');
}

/** Parse with a schema, throwing an InputError that lists every invalid field. */
export function parseOrThrow<S extends z.ZodType>(schema: S, input: unknown, source: string): z.infer<S> {
  // A version-1 config gets the list of renames it needs, not a page of unknown fields.
  const old = version1Message(input, source);
  if (old) throw new InputError(old);
  const r = schema.safeParse(input);
  if (!r.success) throw new InputError(formatZodError(r.error, input, source));
  return r.data;
}

/** Model errors (from the physics layer) are input errors too. */
export function asInputError(e: unknown, source: string): unknown {
  if (e instanceof ModelError) return new InputError(`${source}: ${e.message}`);
  return e;
}

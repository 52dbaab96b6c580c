/**
 * The identity of a sweep: a SHA-256 of the validated config with its defaults filled in
 * and its keys sorted, so key order and omitted defaults do not change it, while any
 * changed value that could alter a result does.
 */
import { createHash } from 'node:crypto';
import type { SweepConfig } from '../io/schemas/sweep-config.js';

function canonical(v: unknown): string {
  if (Array.isArray(v)) return `[${v.map(canonical).join(',')}]`;
  if (v && typeof v === 'object') {
    const entries = Object.entries(v as Record<string, unknown>).filter(([, x]) => x !== undefined);
    entries.sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
    return `{${entries.map(([k, x]) => `${JSON.stringify(k)}:${canonical(x)}`).join(',')}}`;
  }
  return JSON.stringify(v);
}

export function configHash(config: SweepConfig): string {
  return createHash('sha256').update(canonical(config)).digest('hex');
}

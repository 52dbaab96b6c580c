/** Turns thrown errors into one clear message on stderr and a non-zero exit code. */
import { InputError, RunFailure } from '../io/errors.js';
import { defaultWorkers } from '../io/worker-count.js';
import { ModelError } from '../physics/chain.js';

export function reportError(e: unknown): number {
  if (e instanceof InputError || e instanceof ModelError) {
    process.stderr.write(`mesofield: invalid input\n${e.message}\n`);
    return 2;
  }
  if (e instanceof RunFailure) {
    process.stderr.write(`mesofield: ${e.message}\n`);
    return 3;
  }
  const err = e as Error;
  process.stderr.write(`mesofield: unexpected error: ${err?.stack ?? String(e)}\n`);
  return 1;
}

/** Wrap a command action so every failure exits with the right code. */
export function action<A extends unknown[]>(fn: (...args: A) => Promise<number | void> | number | void): (...args: A) => Promise<void> {
  return async (...args: A) => {
    try {
      const code = await fn(...args);
      process.exitCode = code ?? 0;
    } catch (e) {
      process.exitCode = reportError(e);
    }
  };
}

/** Parse a numeric flag, naming the flag on failure. */
export function numberFlag(name: string, value: string | undefined): number | undefined {
  if (value === undefined) return undefined;
  const v = Number(value);
  if (value.trim() === '' || !Number.isFinite(v)) throw new InputError(`${name}: got ${JSON.stringify(value)}; allowed: a number`);
  return v;
}

const MAX_WORKERS = 64;

/** --workers: worker threads, a whole number from 1 to 64; default min(2, cores). */
export function workersFlag(value: string | undefined): number {
  const k = numberFlag('--workers', value);
  if (k === undefined) return defaultWorkers();
  if (!Number.isInteger(k) || k < 1 || k > MAX_WORKERS) throw new InputError(`--workers: got ${value}; allowed: a whole number from 1 to ${MAX_WORKERS}`);
  return k;
}

/**
 * Turns thrown errors into one clear message on stderr and the exit code of the contract
 * (exit-codes.ts): input and environment 2, failed run 3, internal error 4. No stack trace
 * reaches a user unless they ask with --debug.
 */
import { InputError, RunFailure } from '../io/errors.js';
import { describeFsError, isFsError } from '../io/fs-errors.js';
import { defaultWorkers } from '../io/worker-count.js';
import { ModelError } from '../physics/chain.js';
import { RunStopped, stopExitCode } from '../runtime/stop.js';
import { invocation, reproduceLine } from './cli-context.js';
import { writeCrashFile } from './crash-file.js';
import { parseDecimal } from './decimal-text.js';
import { EXIT } from './exit-codes.js';

export function reportError(e: unknown): number {
  if (e instanceof InputError || e instanceof ModelError) {
    process.stderr.write(`mesofield: invalid input\n${e.message}\n`);
    return EXIT.input;
  }
  if (isFsError(e)) {
    process.stderr.write(`mesofield: cannot use a path\n${describeFsError(e)}\n`);
    return EXIT.input;
  }
  if (e instanceof RunStopped) {
    process.stderr.write(`mesofield: ${e.message}\n`);
    return stopExitCode();
  }
  if (e instanceof RunFailure) {
    process.stderr.write(`mesofield: ${e.message}\n`);
    return EXIT.runFailed;
  }
  const err = e as Error | undefined;
  const { debug } = invocation();
  const what = err?.message ? `${err.name ?? 'Error'}: ${err.message.split('\n')[0]}` : String(e);
  const crash = writeCrashFile(e);
  process.stderr.write(`mesofield: internal error (a bug, please report it): ${what}\n  to reproduce: ${reproduceLine()}${debug ? '' : ' --debug'}\n${crash ? `  the trace is saved in ${crash} (attach it to the report)\n` : ''}`);
  if (debug && err?.stack) process.stderr.write(`${err.stack}\n`);
  return EXIT.internal;
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
  const r = parseDecimal(name, String(value));
  if (typeof r === 'string') throw new InputError(r);
  return r;
}

/** A flag that must be given, as a number `ok` accepts: a missing or refused value names the flag and what is allowed. */
export function requiredFlag(name: string, v: number | undefined, ok: (v: number) => boolean, allowed: string): number {
  if (v === undefined) throw new InputError(`${name}: missing; allowed: ${allowed}`);
  if (!ok(v)) throw new InputError(`${name}: got ${v}; allowed: ${allowed}`);
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

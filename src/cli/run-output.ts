/**
 * The output directory of a command run, from its flags: claimed before any work starts
 * (io/output-directory.ts says what is allowed), released however the run ends.
 */
import { InputError } from '../io/errors.js';
import { RunStopped } from '../runtime/stop.js';
import { claimOutputDirectory, failedOutputPath } from '../io/output-directory.js';
import type { OutputDirectory } from '../io/output-directory.js';

export interface OutputFlags {
  out?: string;
  overwrite?: boolean;
}

/** Claim --out for `command` (undefined when no --out was given). */
export function claimOut(flags: OutputFlags, command: string, opts: { continuePrevious?: boolean } = {}): OutputDirectory | undefined {
  if (flags.out === undefined) {
    if (flags.overwrite) throw new InputError('--overwrite: given without --out; it replaces a previous output in the --out directory');
    return undefined;
  }
  return claimOutputDirectory(flags.out, command, { overwrite: flags.overwrite, continuePrevious: opts.continuePrevious });
}

/**
 * Run `work` with the claimed output; the lock is released and an empty directory this run
 * created is removed when `work` throws, so a refused or failed run leaves nothing behind.
 */
export async function withOutput<T>(out: OutputDirectory | undefined, work: () => Promise<T> | T): Promise<T> {
  try {
    const r = await work();
    out?.finish();
    return r;
  } catch (e) {
    // A run stopped by a signal that saved its work there: that is its output (marked, to resume).
    // One stopped before it wrote anything leaves the directory as it found it.
    if (e instanceof RunStopped && out?.hasWritten()) out.finish(false);
    else out?.abandon();
    throw e;
  }
}

/**
 * The files of a failed run, written beside the requested directory (DIR.failed) so they
 * never replace a good result there. Returns where they went, or a sentence saying why not.
 */
export function writeFailedOutput(dir: string, command: string, files: Record<string, string | Uint8Array>): string {
  const path = failedOutputPath(dir);
  try {
    const out = claimOutputDirectory(path, `${command} (failed)`, { overwrite: true });
    out.write(files);
    out.finish();
    return `the failed run's files are in ${path} (${dir} was left as it was)`;
  } catch (e) {
    return `the failed run's files were not written (${(e as Error).message.split('\n')[0]}); ${dir} was left as it was`;
  }
}

/**
 * An internal error (a bug) is shown to the user as one line; its stack trace is kept for the
 * bug report in a crash file in the system's temporary folder, so a long run that failed does
 * not have to be repeated with --debug to learn where. The file holds the command line, the
 * versions and the full trace — a worker thread's too (threads/worker-pool.ts keeps it under
 * the error). Nothing else is written; if the temporary folder cannot be written, no file.
 */
import { writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { mesofieldVersion } from '../io/versions.js';
import { reproduceLine } from './cli-context.js';

/** Write the crash file for `e`; returns its path, or null when it could not be written. */
export function writeCrashFile(e: unknown): string | null {
  const err = e as Error | undefined;
  const stamp = new Date().toISOString().replace(/[:.]/g, '-');
  const path = join(tmpdir(), `mesofield-crash-${stamp}-${process.pid}.txt`);
  let version = 'unknown';
  try {
    version = mesofieldVersion();
  } catch {
    // an unreadable package.json must not hide the trace
  }
  const text = [
    `command: ${reproduceLine()}`,
    `mesofield ${version}, node ${process.version}, ${process.platform}-${process.arch}`,
    `time: ${new Date().toISOString()}`,
    '',
    typeof err?.stack === 'string' ? err.stack : String(e),
    '',
  ].join('\n');
  try {
    writeFileSync(path, text, { flag: 'wx' });
    return path;
  } catch {
    return null;
  }
}

/**
 * Where a run may write (`--out DIR`). A run writes only into a directory that is new, empty,
 * or a previous output of the same command — marked by OUTPUT_MARKER, which the tool writes
 * and which lists the files it wrote. Anything else (a file, `.`, a symbolic link, a folder
 * with other files, another command's output) is refused before any work starts, naming the
 * path. Replacing a previous output needs `--overwrite` and replaces only the files the tool
 * wrote; a lock file refuses a second concurrent writer. Files are written one by one, each
 * atomically (temporary sibling, then rename), never by removing or renaming the folder.
 */
import { existsSync, lstatSync, mkdirSync, readdirSync, readFileSync, realpathSync, rmdirSync, rmSync } from 'node:fs';
import { basename, dirname, join, relative, resolve, sep } from 'node:path';
import { writeFileAtomic } from './atomic-write.js';
import { InputError } from './errors.js';
import { describeFsError, isFsError } from './fs-errors.js';
import { acquireLock } from './lock-file.js';
import type { LockFile } from './lock-file.js';

export const OUTPUT_MARKER = '.mesofield-output.json';
export const OUTPUT_LOCK = '.mesofield-lock';

interface Marker {
  tool: 'mesofield';
  command: string;
  files: string[];
  complete: boolean;
  updatedAt: string;
}

export interface ClaimOptions {
  /** How the user named the directory in messages (default "--out"). */
  flag?: string;
  /** Replace a previous output of the same command (only the files it wrote). */
  overwrite?: boolean;
  /** Continue a previous output of the same command (train --resume, sweep shards). */
  continuePrevious?: boolean;
  /**
   * The directory is a subfolder of a run's output (RUN/report): without a marker of its own,
   * files there that the run's marker lists (written by e.g. `train --report`) count as a
   * previous output of this command, so they may be replaced with --overwrite.
   */
  nestedInRun?: boolean;
}

export interface OutputDirectory {
  dir: string;
  command: string;
  /** Write files (paths relative to the directory), each atomically; the marker follows. */
  write(files: Record<string, string | Uint8Array>): string[];
  /** Record every file now in the directory (except what was there and not ours) as the tool's; release the lock. `complete` false: a stopped run, to be resumed. */
  finish(complete?: boolean): void;
  /** Release the lock; a directory this claim created and left empty is removed. */
  abandon(): void;
  /** This run has written a file here (through write(), or a new file by a writer of its own). */
  hasWritten(): boolean;
}

/** A subfolder's files that its parent's marker lists as a run's own: a previous output of `command`. */
function markerFromParent(dir: string, command: string): Marker | null {
  const parent = readMarker(dirname(dir));
  if (!parent) return null;
  const prefix = `${basename(dir)}/`;
  const files = listFiles(dir).filter((f) => f !== OUTPUT_LOCK);
  const listed = new Set(parent.files.filter((f) => f.startsWith(prefix)).map((f) => f.slice(prefix.length)));
  return files.length > 0 && files.every((f) => listed.has(f)) ? { tool: 'mesofield', command, files, complete: true, updatedAt: '' } : null;
}

function readMarker(dir: string): Marker | null {
  const p = join(dir, OUTPUT_MARKER);
  // A checkpoint written before output markers existed: train's output, its files ours.
  if (!existsSync(p) && existsSync(join(dir, 'checkpoint.json'))) return { tool: 'mesofield', command: 'train', files: listFiles(dir), complete: true, updatedAt: '' };
  if (!existsSync(p)) return null;
  try {
    const m = JSON.parse(readFileSync(p, 'utf8')) as Marker;
    return m && m.tool === 'mesofield' && typeof m.command === 'string' && Array.isArray(m.files) ? m : null;
  } catch {
    return null;
  }
}

function listFiles(dir: string, base = dir): string[] {
  const out: string[] = [];
  for (const e of readdirSync(dir, { withFileTypes: true })) {
    const p = join(dir, e.name);
    if (e.isDirectory()) out.push(...listFiles(p, base));
    else out.push(relative(base, p).split(sep).join('/'));
  }
  return out;
}

const shortList = (names: string[]) => (names.length > 4 ? `${names.slice(0, 4).join(', ')}, … (${names.length} entries)` : names.join(', '));

/** Check `dir` for `command`, take its lock and return a writer; throws InputError (exit 2) naming the path otherwise. */
export function claimOutputDirectory(dir: string, command: string, opts: ClaimOptions = {}): OutputDirectory {
  const flag = opts.flag ?? '--out';
  if (dir.trim() === '') throw new InputError(`${flag}: got "" (empty); allowed: a path to a new or empty directory`);
  const abs = resolve(dir);
  const cwd = process.cwd();
  if (abs === cwd || cwd.startsWith(abs + sep) || abs === dirname(abs)) {
    throw new InputError(`${flag}: got ${JSON.stringify(dir)}, the current directory or one above it; allowed: a new or empty directory (e.g. --out runs/${command}-1); nothing was written`);
  }
  const say = `${flag} ${dir}`;
  let created = false;
  try {
    if (existsSync(abs) || lstatSync(abs, { throwIfNoEntry: false })) {
      const st = lstatSync(abs);
      if (st.isSymbolicLink()) throw new InputError(`${say}: is a symbolic link; allowed: a real directory${linkTarget(abs)} — nothing was written`);
      if (!st.isDirectory()) throw new InputError(`${say}: is a file, not a directory; allowed: a new or empty directory — the file was left as it is`);
      const entries = readdirSync(abs).filter((n) => n !== OUTPUT_LOCK);
      const marker = readMarker(abs) ?? (opts.nestedInRun ? markerFromParent(abs, command) : null);
      // Only a marker that lists no files: a run killed before it wrote anything (a short
      // command has no stop handler, so SIGINT ends it where it stands). Nothing to keep: empty.
      const claimedOnly = marker !== null && marker.files.length === 0 && entries.every((n) => n === OUTPUT_MARKER);
      if (entries.length > 0 && !claimedOnly) {
        if (!marker) {
          throw new InputError(`${say}: is not empty and was not written by mesofield (it holds ${shortList(entries)}); allowed: a new or empty directory, or a previous ${command} output — nothing was written or deleted`);
        }
        if (marker.command !== command) {
          throw new InputError(`${say}: holds the output of mesofield ${marker.command}; allowed: a new or empty directory, or a previous ${command} output — nothing was written or deleted`);
        }
        if (!opts.overwrite && !opts.continuePrevious) {
          throw new InputError(`${say}: holds a previous ${command} output; give --overwrite to replace it (only the files mesofield wrote there), or choose another --out`);
        }
      }
    } else {
      mkdirSync(abs, { recursive: true });
      created = true;
    }
  } catch (e) {
    if (isFsError(e)) throw new InputError(`${flag}: cannot use ${describeFsError(e, dir)}`);
    throw e;
  }
  let lock: LockFile;
  try {
    lock = acquireLock(join(abs, OUTPUT_LOCK), command, say);
  } catch (e) {
    if (created) rmSync(abs, { recursive: true, force: true });
    if (isFsError(e)) throw new InputError(`${flag}: cannot write into ${describeFsError(e, dir)}`);
    throw e;
  }
  const previous = readMarker(abs) ?? (opts.nestedInRun ? markerFromParent(abs, command) : null);
  const markerPath = join(abs, OUTPUT_MARKER);
  const previousMarkerText = existsSync(markerPath) ? readFileSync(markerPath) : null;
  const ours = new Set(previous?.files ?? []);
  const foreign = new Set(listFiles(abs).filter((f) => f !== OUTPUT_LOCK && f !== OUTPUT_MARKER && !ours.has(f)));
  const written = new Set<string>();
  const mark = (complete: boolean, files: string[]) =>
    writeFileAtomic(join(abs, OUTPUT_MARKER), `${JSON.stringify({ tool: 'mesofield', command, files, complete, updatedAt: new Date().toISOString() } satisfies Marker, null, 1)}\n`);
  const wrap = <T>(f: () => T): T => {
    try {
      return f();
    } catch (e) {
      if (isFsError(e)) throw new InputError(`${flag}: cannot write ${describeFsError(e)}`);
      throw e;
    }
  };
  // Files this run wrote: through write(), or by a writer of its own (checkpoints) — any file new since the claim.
  const hasWritten = () => written.size > 0 || listFiles(abs).some((f) => f !== OUTPUT_LOCK && f !== OUTPUT_MARKER && !foreign.has(f) && !ours.has(f));
  // Marked (incomplete) at once: a run killed before it writes anything still leaves a folder
  // that says whose it is, so the next run (a resume) may continue it.
  wrap(() => mark(false, [...ours]));
  return {
    dir,
    command,
    write(files) {
      return wrap(() => {
        // Marked incomplete first: a run killed half-way leaves an output that says so.
        mark(false, [...new Set([...ours, ...written, ...Object.keys(files)])]);
        for (const [name, data] of Object.entries(files)) {
          writeFileAtomic(join(abs, name), data);
          written.add(name);
        }
        return Object.keys(files).map((n) => join(dir, n));
      });
    },
    finish(complete = true) {
      wrap(() => {
        const now = listFiles(abs).filter((f) => f !== OUTPUT_LOCK && f !== OUTPUT_MARKER && !foreign.has(f));
        // Files of a replaced previous output that this run did not write again are stale: remove them.
        if (complete) {
          for (const f of ours) {
            if (written.has(f) || !now.includes(f) || !opts.overwrite || opts.continuePrevious) continue;
            rmSync(join(abs, f), { force: true });
            // A subfolder that held only stale files of ours (a report's figures/) goes with them.
            for (let d = dirname(join(abs, f)); d !== abs && d.startsWith(abs + sep) && readdirSync(d).length === 0; d = dirname(d)) rmdirSync(d);
          }
        }
        mark(complete, listFiles(abs).filter((f) => f !== OUTPUT_LOCK && f !== OUTPUT_MARKER && !foreign.has(f)));
      });
      lock.release();
    },
    hasWritten,
    abandon() {
      lock.release();
      if (hasWritten()) return;
      // Nothing was written: put the marker back as it was (or remove it), and a folder this run made.
      if (previousMarkerText) writeFileAtomic(markerPath, previousMarkerText);
      else rmSync(markerPath, { force: true });
      if (created && existsSync(abs) && readdirSync(abs).length === 0) rmdirSync(abs);
    },
  };
}

function linkTarget(p: string): string {
  try {
    return ` (give its target, ${realpathSync(p)}, if that is meant)`;
  } catch {
    return '';
  }
}

/**
 * Where the output of a failed run goes, so it never replaces a good result: DIR.failed,
 * claimed with the same rules (a previous failed output of the same command is replaced).
 */
export function failedOutputPath(dir: string): string {
  return `${dir.replace(/[\\/]+$/, '')}.failed`;
}

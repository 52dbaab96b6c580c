/**
 * One writer per output directory: a lock file created exclusively (O_EXCL) holding the
 * writer's pid. A lock whose process no longer exists (killed with SIGKILL, power loss) is
 * stale and taken over; a live one refuses the second writer with a clear InputError.
 */
import { closeSync, openSync, readFileSync, rmSync, writeSync } from 'node:fs';
import { hostname } from 'node:os';
import { InputError } from './errors.js';

export interface LockFile {
  path: string;
  release(): void;
}

interface LockContent {
  pid: number;
  host: string;
  command: string;
  startedAt: string;
}

function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    // EPERM: the process exists but belongs to someone else.
    return (e as NodeJS.ErrnoException).code === 'EPERM';
  }
}

function readLock(path: string): LockContent | null {
  try {
    return JSON.parse(readFileSync(path, 'utf8')) as LockContent;
  } catch {
    return null;
  }
}

const held = new Set<string>();
let exitHook = false;

/** Take the lock at `path` for `command`; `what` names the directory in messages. */
export function acquireLock(path: string, command: string, what: string): LockFile {
  const content: LockContent = { pid: process.pid, host: hostname(), command, startedAt: new Date().toISOString() };
  for (let attempt = 0; attempt < 2; attempt++) {
    let fd: number;
    try {
      fd = openSync(path, 'wx');
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code !== 'EEXIST') throw e;
      const other = readLock(path);
      const stale = other !== null && other.host === content.host && other.pid !== process.pid && !alive(other.pid);
      if (stale || other === null) {
        // A crashed writer's lock (or a half-written one): take it over.
        rmSync(path, { force: true });
        continue;
      }
      throw new InputError(
        `${what}: in use by another mesofield run (${other.command}, pid ${other.pid} on ${other.host}, started ${other.startedAt}); wait for it to finish or choose another --out (if that run no longer exists, delete ${path})`,
      );
    }
    try {
      writeSync(fd, `${JSON.stringify(content)}\n`);
    } finally {
      closeSync(fd);
    }
    held.add(path);
    if (!exitHook) {
      exitHook = true;
      // However the process ends (exit code, signal handler calling exit), no live lock is left behind.
      process.on('exit', () => {
        for (const p of held) rmSync(p, { force: true });
      });
    }
    return {
      path,
      release: () => {
        if (held.delete(path)) rmSync(path, { force: true });
      },
    };
  }
  throw new InputError(`${what}: could not take the lock ${path}; delete it if no mesofield run is writing there`);
}

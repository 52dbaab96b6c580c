/**
 * Files are written to a temporary sibling and renamed into place, so a reader never
 * sees half a file and an interrupted run never destroys the previous good one.
 */
import { mkdirSync, renameSync, rmSync, writeFileSync, existsSync } from 'node:fs';
import { dirname, join, basename } from 'node:path';

export function writeFileAtomic(path: string, data: string | Uint8Array): void {
  mkdirSync(dirname(path), { recursive: true });
  const tmp = join(dirname(path), `.${basename(path)}.${process.pid}.${Date.now()}.tmp`);
  try {
    writeFileSync(tmp, data);
    renameSync(tmp, path);
  } catch (e) {
    rmSync(tmp, { force: true });
    throw e;
  }
}

/**
 * Write a whole directory of files at once: build it under a temporary name, then swap it
 * in. The previous directory (if any) survives until the new one is complete.
 */
export function writeDirectoryAtomic(dir: string, files: Record<string, string | Uint8Array>): void {
  const parent = dirname(dir);
  mkdirSync(parent, { recursive: true });
  const tmp = join(parent, `.${basename(dir)}.${process.pid}.${Date.now()}.tmp`);
  const old = join(parent, `.${basename(dir)}.${process.pid}.${Date.now()}.old`);
  mkdirSync(tmp, { recursive: true });
  try {
    for (const [name, data] of Object.entries(files)) {
      mkdirSync(dirname(join(tmp, name)), { recursive: true });
      writeFileSync(join(tmp, name), data);
    }
    if (existsSync(dir)) renameSync(dir, old);
    renameSync(tmp, dir);
    rmSync(old, { recursive: true, force: true });
  } catch (e) {
    rmSync(tmp, { recursive: true, force: true });
    if (!existsSync(dir) && existsSync(old)) renameSync(old, dir);
    throw e;
  }
}

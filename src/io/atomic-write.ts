/**
 * Files are written to a temporary sibling and renamed into place, so a reader never
 * sees half a file and an interrupted run never destroys the previous good one.
 */
import { mkdirSync, renameSync, rmSync, writeFileSync } from 'node:fs';
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
 * Write a set of files into a directory: all of them are written in full to temporary
 * siblings first, then renamed into place one after another (in the order given, so put the
 * file that makes the set valid — a checkpoint's meta — last). Nothing else in the directory
 * is touched: the folder is never removed or replaced, so files the tool did not write survive.
 */
export function writeDirectoryAtomic(dir: string, files: Record<string, string | Uint8Array>): void {
  const staged: [string, string][] = [];
  try {
    for (const [name, data] of Object.entries(files)) {
      const path = join(dir, name);
      mkdirSync(dirname(path), { recursive: true });
      const tmp = join(dirname(path), `.${basename(path)}.${process.pid}.${Date.now()}.tmp`);
      writeFileSync(tmp, data);
      staged.push([tmp, path]);
    }
    for (const [tmp, path] of staged) renameSync(tmp, path);
  } catch (e) {
    for (const [tmp] of staged) rmSync(tmp, { force: true });
    throw e;
  }
}

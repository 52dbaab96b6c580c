/**
 * File-system failures as input errors: a path the tool cannot read or write is a problem of
 * the environment the user gave it (exit 2), said in words with the path, never a stack trace.
 */
import { readFileSync } from 'node:fs';
import { InputError } from './errors.js';

const REASONS: Record<string, string> = {
  EACCES: 'permission denied',
  EPERM: 'operation not permitted',
  EBUSY: 'the path is busy (in use, or the current directory)',
  EISDIR: 'is a directory, a file was expected',
  ENOTDIR: 'a part of the path is a file, not a folder',
  EROFS: 'the file system is read-only',
  ENOSPC: 'no space left on the device',
  EDQUOT: 'disk quota exceeded',
  ENOENT: 'no such file or folder',
  EEXIST: 'already exists',
  ENOTEMPTY: 'the folder is not empty',
  ENAMETOOLONG: 'the name is too long',
  ELOOP: 'too many symbolic links',
  EMFILE: 'too many open files',
  EXDEV: 'cannot move across devices',
};

/** The fs error codes that are the environment's fault, not the tool's. */
export function isFsError(e: unknown): e is NodeJS.ErrnoException {
  const code = (e as NodeJS.ErrnoException | null)?.code;
  return typeof code === 'string' && code in REASONS && typeof (e as NodeJS.ErrnoException).syscall === 'string';
}

/** A one-line description of an fs error: "PATH: reason (CODE)". */
export function describeFsError(e: NodeJS.ErrnoException, path?: string): string {
  const where = path ?? e.path ?? '(unknown path)';
  const reason = REASONS[e.code ?? ''] ?? e.code ?? 'file-system error';
  const dest = (e as { dest?: string }).dest;
  const other = dest && dest !== where ? ` (to ${dest})` : '';
  return `${where}${other}: ${reason} (${e.code})`;
}

/** An fs error as an InputError naming the path; anything else unchanged. */
export function fsInputError(e: unknown, path?: string, what?: string): unknown {
  if (!isFsError(e)) return e;
  return new InputError(`${what ? `${what}: ` : ''}${describeFsError(e, path)}`);
}

/**
 * The text of a file the user named (data or config); one that cannot be read is an
 * InputError "PATH: cannot read the file (CODE): reason", with the path as the user wrote it
 * (`shownAs`, when the path read was resolved against a config's folder).
 */
export function readInputText(path: string, shownAs = path): string {
  try {
    return readFileSync(path, 'utf8');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new InputError(`${shownAs}: cannot read the file (${code ?? String(e)})${isFsError(e) ? `: ${describeFsError(e, shownAs).replace(/^.*?: /, '').replace(/ \(\w+\)$/, '')}` : ''}`);
  }
}

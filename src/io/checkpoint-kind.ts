/** The kind of a checkpoint directory, read without loading any network code (commands pick their loader by it). */
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';

/** The `kind` in DIR/checkpoint.json, or undefined when there is no readable one (the loaders then say what is wrong). */
export function checkpointKind(dir: string): unknown {
  const path = join(dir, 'checkpoint.json');
  if (!existsSync(path)) return undefined;
  try {
    return (JSON.parse(readFileSync(path, 'utf8')) as { kind?: unknown } | null)?.kind;
  } catch {
    return undefined;
  }
}

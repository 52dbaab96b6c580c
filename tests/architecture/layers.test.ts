/**
 * The networks live in three layers (DEVELOPERS.md, "How the trainer is put together"):
 * src/autodiff (the engine) ← src/network (the SCFT model) ← src/training (runs). A lower
 * layer never imports a higher one, nor the commands, tools and reports built on top
 * (common practice, no source). Every import is read, type-only and dynamic ones included.
 */
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { dirname, join, normalize, relative } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';

const src = fileURLToPath(new URL('../../src/', import.meta.url));

function tsFiles(dir: string): string[] {
  return readdirSync(dir).flatMap((e) => {
    const p = join(dir, e);
    return statSync(p).isDirectory() ? tsFiles(p) : p.endsWith('.ts') ? [p] : [];
  });
}

/** Top-level folders under src/ that the file's relative imports reach. */
function importedFolders(file: string): string[] {
  const text = readFileSync(file, 'utf8');
  const specs = [...text.matchAll(/(?:from\s+|import\s*\(\s*)['"](\.{1,2}\/[^'"]+)['"]/g)].map((m) => m[1]);
  return specs.map((s) => relative(src, normalize(join(dirname(file), s))).split(/[\\/]/)[0]);
}

const ABOVE_ALL = ['cli', 'bench', 'reports', 'inverse', 'surrogate', 'sweep'];
const RULES: Record<string, string[]> = {
  autodiff: ['network', 'training', 'physics', 'spectral', 'io', ...ABOVE_ALL],
  network: ['training', 'spectral', ...ABOVE_ALL],
  training: ABOVE_ALL,
};

describe('network layers', () => {
  it.each(Object.entries(RULES))('%s imports no higher layer', (layer, forbidden) => {
    const files = tsFiles(join(src, layer));
    expect(files.length).toBeGreaterThan(3);
    const offending = files.flatMap((f) => importedFolders(f).filter((d) => forbidden.includes(d)).map((d) => `${relative(src, f)} → ${d}/`));
    expect(offending).toEqual([]);
  });
});

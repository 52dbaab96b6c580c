/**
 * The whole program type-checks (the TypeScript compiler itself, `tsc --noEmit` with
 * tsconfig.json). The build compiles file by file without checking
 * (scripts/transpile-sources.mjs), so this file is where a type error fails `make test`.
 * `isolatedModules` must stay on: it is what makes tsc refuse the constructs a file-at-a-time
 * compile would write differently from tsc.
 */
import { execFile } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { promisify } from 'node:util';
import { describe, expect, it } from 'vitest';

const root = fileURLToPath(new URL('../../', import.meta.url));

describe('type check', () => {
  it('tsconfig.json keeps isolatedModules on (the build compiles file by file)', () => {
    const config = JSON.parse(readFileSync(`${root}tsconfig.json`, 'utf8')) as { compilerOptions: Record<string, unknown> };
    expect(config.compilerOptions.isolatedModules).toBe(true);
  });

  it('tsc --noEmit finds no error in src/', async () => {
    const tsc = `${root}node_modules/typescript/bin/tsc`;
    const run = promisify(execFile)(process.execPath, [tsc, '-p', 'tsconfig.json', '--noEmit', '--pretty', 'false'], { cwd: root, maxBuffer: 1 << 24 });
    const outcome = await run.then(
      (r) => ({ code: 0, out: r.stdout + r.stderr }),
      (e: { code?: number; stdout?: string; stderr?: string }) => ({ code: e.code ?? -1, out: `${e.stdout ?? ''}${e.stderr ?? ''}` }),
    );
    expect(outcome.out).toBe('');
    expect(outcome.code).toBe(0);
  });
});

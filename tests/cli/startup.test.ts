/**
 * Start-up: what a command loads before it answers. A module-resolution hook (node:module
 * register, Node's documented loader hooks) lists every module the process resolves; the
 * cheap commands must not resolve what they do not need. Timings are in `npm run bench`
 * (a test never fails on a time).
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { describe, expect, it } from 'vitest';
import { CLI } from '../helpers/run-cli.js';

const dir = mkdtempSync(join(tmpdir(), 'mesofield-startup-'));
const hooks = join(dir, 'hooks.mjs');
writeFileSync(hooks, "export async function resolve(s, c, next) { const r = await next(s, c); process.stderr.write('RESOLVED ' + r.url + '\\n'); return r; }\n");
const register = join(dir, 'register.mjs');
writeFileSync(register, `import { register } from 'node:module';\nregister(${JSON.stringify(pathToFileURL(hooks).href)});\n`);

function loaded(args: string[]): { stdout: string; modules: string[] } {
  const r = spawnSync(process.execPath, ['--import', pathToFileURL(register).href, CLI, ...args], { encoding: 'utf8', timeout: 60_000 });
  expect(r.status, r.stderr).toBe(0);
  return { stdout: r.stdout, modules: [...r.stderr.matchAll(/^RESOLVED (.*)$/gm)].map((m) => m[1]) };
}

describe('start-up loads only what the command needs', () => {
  it('--version: the version from package.json, without commander, zod or any command', () => {
    const { stdout, modules } = loaded(['--version']);
    expect(stdout).toBe(`${JSON.parse(readFileSync('package.json', 'utf8')).version}\n`);
    expect(modules.length).toBeGreaterThan(0);
    expect(modules.filter((m) => /node_modules\/(commander|zod)\//.test(m))).toEqual([]);
    expect(modules.filter((m) => /\/cli\/commands\//.test(m))).toEqual([]);
  });

  it('spinodal: no solver, report, chart or tfjs code', () => {
    const { modules } = loaded(['spinodal', '--f', '0.5']);
    expect(modules.filter((m) => /\/(spectral|reports|training|network|autodiff)\/|chart\.js|@tensorflow|canvas/.test(m))).toEqual([]);
  });
});

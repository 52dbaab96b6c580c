/**
 * Start-up: what a command loads before it answers. A module-resolution hook (node:module
 * register, Node's documented loader hooks) lists every module the process resolves; the
 * cheap commands must not resolve what they do not need. Built-in modules that a CommonJS
 * bundle requires do not pass that hook: Node's process.moduleLoadList (its list of loaded
 * built-ins) shows them. Timings are in `npm run bench -- --startup` (a test never fails on a time).
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
writeFileSync(
  register,
  `import { register } from 'node:module';\nregister(${JSON.stringify(pathToFileURL(hooks).href)});\n` +
    "process.on('exit', () => process.stderr.write('BUILTINS ' + JSON.stringify(process.moduleLoadList) + '\\n'));\n",
);

function loaded(args: string[]): { stdout: string; modules: string[]; builtins: string[] } {
  const r = spawnSync(process.execPath, ['--import', pathToFileURL(register).href, CLI, ...args], { encoding: 'utf8', timeout: 60_000 });
  expect(r.status, r.stderr).toBe(0);
  const list = /^BUILTINS (.*)$/m.exec(r.stderr);
  expect(list, 'process.moduleLoadList printed at exit').not.toBeNull();
  const builtins = JSON.parse(list![1]) as unknown;
  expect(Array.isArray(builtins)).toBe(true);
  return { stdout: r.stdout, modules: [...r.stderr.matchAll(/^RESOLVED (.*)$/gm)].map((m) => m[1]), builtins: builtins as string[] };
}

const own = (modules: string[], folder: string) => modules.filter((m) => m.includes(`/dist/${folder}/`)).map((m) => m.replace(/.*\/dist\//, ''));

describe('start-up loads only what the command needs', () => {
  it('--version: the version from package.json, without commander, zod or any command', () => {
    const { stdout, modules } = loaded(['--version']);
    expect(stdout).toBe(`${JSON.parse(readFileSync('package.json', 'utf8')).version}\n`);
    expect(modules.length).toBeGreaterThan(0);
    expect(modules.filter((m) => /(commander|zod)(\/|\.js$)/.test(m))).toEqual([]);
    expect(modules.filter((m) => /\/cli\/commands\//.test(m))).toEqual([]);
  });

  it('spinodal: no solver, report, chart or tfjs code; zod and commander as one file each, not their packages', () => {
    const { stdout, modules, builtins } = loaded(['spinodal', '--f', '0.5']);
    expect(stdout).toMatch(/\(χN\)_s = 10\.49/);
    expect(modules.filter((m) => /\/(spectral|reports|training|network|autodiff)\/|chart\.js|@tensorflow|canvas/.test(m))).toEqual([]);
    // The build bundles both packages (scripts/bundle-dependencies.mjs): no file of theirs under node_modules loads.
    expect(modules.filter((m) => /node_modules\/(zod|commander)\//.test(m))).toEqual([]);
    expect(own(modules, 'vendor').sort()).toEqual(['vendor/commander.js', 'vendor/zod.js']);
    // commander's child_process (and with it dgram) loads only for executable subcommands (net loads
    // anyway here: stdout and stderr are pipes). The list is of the process's built-ins: check it has some.
    expect(builtins.some((b) => /^NativeModule fs$/.test(b))).toBe(true);
    expect(builtins.filter((b) => /^NativeModule (child_process|internal\/child_process|dgram)$/.test(b))).toEqual([]);
  });

  it('schema solve: the text the build wrote (dist/config-schemas), without zod, any config schema or the reference generator', () => {
    const { stdout, modules } = loaded(['schema', 'solve']);
    expect(JSON.parse(stdout).properties.kind).toBeDefined();
    expect(stdout).toBe(readFileSync('dist/config-schemas/solve.json', 'utf8'));
    expect(modules.filter((m) => /(commander|zod)(\/|\.js$)/.test(m))).toEqual(modules.filter((m) => /vendor\/commander\.js$/.test(m)));
    expect([...new Set(own(modules, 'io/schemas'))]).toEqual(['io/schemas/config-schema-loaders.js']);
    expect(modules.filter((m) => /config-reference\.js$|\/(spectral|reports|training|network|autodiff)\//.test(m))).toEqual([]);
  });
});

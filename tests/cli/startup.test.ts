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
// The hooks run on a thread of their own, whose process.stderr passes lines to the main thread
// asynchronously: a synchronous write to fd 2 leaves none queued when a quick command exits. (A
// whole-suite run at load 12 once missed two of spinodal's lines with process.stderr.write; 25
// runs at load 3 did not reproduce it.)
writeFileSync(hooks, "import { writeSync } from 'node:fs';\nexport async function resolve(s, c, next) { const r = await next(s, c); writeSync(2, 'RESOLVED ' + r.url + '\\n'); return r; }\n");
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

  it('spinodal: no solver, report, chart or tfjs code, and neither zod nor commander (cli/quick-answer.ts)', () => {
    const { stdout, modules, builtins } = loaded(['spinodal', '--f', '0.5']);
    expect(stdout).toMatch(/\(χN\)_s = 10\.49/);
    expect(modules.filter((m) => /\/(spectral|reports|training|network|autodiff)\/|chart\.js|@tensorflow|canvas/.test(m))).toEqual([]);
    expect(modules.filter((m) => /(commander|zod)(\/|\.js$)/.test(m))).toEqual([]);
    expect(modules.filter((m) => /\/cli\/(commands\/|run-cli|run-command)/.test(m))).toEqual([]);
    expect([...new Set(own(modules, 'physics'))].sort()).toEqual(['physics/chain-bounds.js', 'physics/chain.js', 'physics/rpa.js']);
    // The list is of the process's built-ins: check it has some; the socket code of child_process is not among them.
    expect(builtins.some((b) => /^NativeModule fs$/.test(b))).toBe(true);
    expect(builtins.filter((b) => /^NativeModule (child_process|internal\/child_process|dgram)$/.test(b))).toEqual([]);
  });

  it('a spinodal call the quick path does not take (a bad value) loads the command, zod and commander as one file each', () => {
    const r = spawnSync(process.execPath, ['--import', pathToFileURL(register).href, CLI, 'spinodal', '--f', '1.5'], { encoding: 'utf8', timeout: 60_000 });
    expect(r.status).toBe(2);
    const modules = [...r.stderr.matchAll(/^RESOLVED (.*)$/gm)].map((m) => m[1]);
    expect(modules.filter((m) => /node_modules\/(zod|commander)\//.test(m))).toEqual([]);
    expect(own(modules, 'vendor').sort()).toEqual(['vendor/commander.js', 'vendor/zod.js']);
    expect(own(modules, 'cli/commands')).toEqual(['cli/commands/spinodal.js']);
  });

  it('schema solve: the text the build wrote (dist/config-schemas), without zod, commander, any config schema or the reference generator', () => {
    const { stdout, modules } = loaded(['schema', 'solve']);
    expect(JSON.parse(stdout).properties.kind).toBeDefined();
    expect(stdout).toBe(readFileSync('dist/config-schemas/solve.json', 'utf8'));
    expect(modules.filter((m) => /(commander|zod)(\/|\.js$)/.test(m))).toEqual([]);
    expect([...new Set(own(modules, 'io/schemas'))].sort()).toEqual(['io/schemas/built-schema-text.js', 'io/schemas/config-schema-loaders.js']);
    expect(modules.filter((m) => /config-reference\.js$|\/cli\/commands\/|\/(spectral|reports|training|network|autodiff)\//.test(m))).toEqual([]);
  });
});

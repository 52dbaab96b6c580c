/**
 * Config files of every kind, broken in every way a file can be: not JSON, empty, a folder,
 * a byte-order mark, a top level that is not an object, wrong kind or version, unknown keys,
 * numbers JSON cannot hold, wrong types, out-of-range values, missing keys. The valid bases
 * are the shipped configs (configs/), so the cases follow their renames.
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { expect } from 'vitest';
import { runCli } from '../../src/cli/run-cli.js';
import type { FaultCase, Sandbox } from './harness.js';
import { PROFILE_CSV } from './profiles.js';

const shipped = (name: string) => JSON.parse(readFileSync(fileURLToPath(new URL(`../../configs/${name}`, import.meta.url)), 'utf8')) as Record<string, unknown>;

/** A small, fast valid solve config (the shipped one on a 16-point grid at a given period). */
export function smallSolveConfig(): Record<string, unknown> {
  const c = shipped('diblock-symmetric-chiN15.solve.json');
  c.cell = { ...(c.cell as object), period: 3.7, nx: 16, ns: 20 };
  return c;
}

interface Kind {
  kind: string;
  base: () => Record<string, unknown>;
  argv: (s: Sandbox, cfg: string) => string[];
}

const KINDS: Kind[] = [
  { kind: 'solve', base: smallSolveConfig, argv: (_s, cfg) => ['solve', cfg, '--quiet'] },
  { kind: 'train', base: () => shipped('diblock-symmetric-chiN15.train.json'), argv: (s, cfg) => ['train', cfg, '--out', s.path('run'), '--quiet'] },
  { kind: 'surrogate', base: () => shipped('diblock-chiN12-20.surrogate.json'), argv: (s, cfg) => ['train', cfg, '--out', s.path('run'), '--quiet'] },
  { kind: 'sweep', base: () => shipped('sweep-chiN.sweep.json'), argv: (s, cfg) => ['sweep', cfg, '--out', s.path('run'), '--workers', '1', '--quiet'] },
  {
    kind: 'invert',
    base: () => ({ version: 2, kind: 'invert', system: { chain: { type: 'diblock', f: 0.5 } } }),
    argv: (s, cfg) => ['invert', s.write('p.csv', PROFILE_CSV), cfg, '--quiet'],
  },
];

/** Faults of the file itself, the same for every kind. */
function fileFaults(k: Kind): FaultCase[] {
  const group = 'config files';
  const c = (name: string, setup: (s: Sandbox) => string, code: number, message: RegExp): FaultCase => {
    let cfg = '';
    return { group, name: `${k.kind}: ${name}`, setup: (s) => void (cfg = setup(s)), argv: (s) => k.argv(s, cfg), code, message };
  };
  const text = (t: string) => (s: Sandbox) => s.write('cfg.json', t);
  const withBase = (edit: (b: Record<string, unknown>) => unknown) => (s: Sandbox) => {
    const b = k.base();
    return s.json('cfg.json', edit(b) ?? b);
  };
  return [
    c('invalid JSON', text('{ "version": 1, '), 2, /cfg\.json: not valid JSON/),
    c('NaN literal', text('{ "version": 1, "kind": "x", "a": NaN }'), 2, /cfg\.json: not valid JSON/),
    c('empty file', text(''), 2, /cfg\.json: the file is empty/),
    c('only spaces', text('  \n '), 2, /cfg\.json: the file is empty/),
    c('a directory', (s) => s.mkdir('cfg.json'), 2, /cfg\.json: cannot read the file \(EISDIR\)/),
    c('missing file', (s) => s.path('nope.json'), 2, /nope\.json: cannot read the file \(ENOENT\)/),
    c('top level null', text('null'), 2, /\(top level\): got null; allowed: a JSON object/),
    c('top level string', text('"solve"'), 2, /\(top level\): got a string \("solve"\); allowed: a JSON object/),
    c('top level number', text('42'), 2, /\(top level\): got a number \(42\); allowed: a JSON object/),
    c('top level true', text('true'), 2, /\(top level\): got a boolean \(true\); allowed: a JSON object/),
    c('top level array', text('[1, 2]'), 2, /\(top level\): got an array; allowed: a JSON object/),
    c('wrong kind', withBase((b) => ({ ...b, kind: 'banana' })), 2, /kind: got "banana"/),
    c('wrong version', withBase((b) => ({ ...b, version: 99 })), 2, /version: got 99/),
    c('unknown top-level key', withBase((b) => ({ ...b, colour: 'blue' })), 2, /unknown field\(s\) "colour"/),
    c('a number too large for a double', (s) => s.write('cfg.json', JSON.stringify(k.base()).replace(/"version":\s*\d+/, '"version": 1e999')), 2, /line 1: the number 1e999 is beyond the range of a double/),
    c('a number too small for a double', (s) => s.write('cfg.json', JSON.stringify({ ...k.base(), tiny: 1 }).replace('"tiny":1', '"tiny":1e-400')), 2, /the number 1e-400 is too small to represent/),
    // A byte-order mark is read past: the error is then about the content, not "not valid JSON".
    c('byte-order mark before a wrong kind', (s) => s.write('cfg.json', `\uFEFF${JSON.stringify({ ...k.base(), kind: 'banana' })}`), 2, /kind: got "banana"/),
  ];
}

/** Faults of fields, per kind (types, NaN/Infinity-like values, ranges, missing keys, words). */
function fieldFaults(): FaultCase[] {
  const group = 'config fields';
  const out: FaultCase[] = [];
  const add = (k: Kind, name: string, edit: (b: Record<string, any>) => void, message: RegExp) => {
    let cfg = '';
    out.push({
      group,
      name: `${k.kind}: ${name}`,
      setup: (s) => {
        const b = k.base() as Record<string, any>;
        edit(b);
        cfg = s.json('cfg.json', b);
      },
      argv: (s) => k.argv(s, cfg),
      code: 2,
      message,
    });
  };
  const [solve, train, surrogate, sweep, invert] = KINDS;
  add(solve, 'χN as a string', (b) => (b.system.chiN = '15'), /cfg\.json: system\.chiN: got "15"/);
  add(solve, 'χN null (what JSON makes of NaN)', (b) => (b.system.chiN = null), /cfg\.json: system\.chiN: got null/);
  add(solve, 'χN negative', (b) => (b.system.chiN = -1), /system\.chiN: got -1/);
  add(solve, 'χN above 500', (b) => (b.system.chiN = 501), /system\.chiN: got 501/);
  add(solve, 'f above 1', (b) => (b.system.chain.f = 1.2), /system\.chain\.f: got 1\.2/);
  add(solve, 'f missing', (b) => delete b.system.chain.f, /system\.chain\.f: got nothing \(missing\)/);
  add(solve, 'chain type unknown', (b) => (b.system.chain.type = 'star'), /system\.chain\.type: got "star"/);
  add(solve, 'system missing', (b) => delete b.system, /system: got nothing \(missing\)/);
  add(solve, 'nx not a power of two', (b) => (b.cell.nx = 100), /cell\.nx: got 100;.*power of two/);
  add(solve, 'nx fractional', (b) => (b.cell.nx = 16.5), /cell\.nx: got 16\.5/);
  add(solve, 'ns too small', (b) => (b.cell.ns = 2), /cell\.ns: got 2/);
  add(solve, 'period zero', (b) => (b.cell.period = 0), /cell\.period: got 0/);
  add(solve, 'period negative', (b) => (b.cell.period = -3), /cell\.period: got -3/);
  add(solve, 'period a misspelt word', (b) => (b.cell.period = 'optimise'), /cell\.period: got "optimise"; allowed: a number, or "equilibrium"/);
  add(solve, 'periods zero', (b) => (b.cell.periods = 0), /cell\.periods: got 0/);
  add(solve, 'periods fractional', (b) => (b.cell.periods = 1.5), /cell\.periods: got 1\.5/);
  add(solve, 'tolerance zero', (b) => (b.solver = { ...b.solver, tolerance: 0 }), /solver\.tolerance: got 0/);
  add(solve, 'tolerance a string', (b) => (b.solver = { ...b.solver, tolerance: '1e-9' }), /solver\.tolerance: got "1e-9"/);
  add(solve, 'start of unknown type', (b) => (b.solver = { ...b.solver, start: { type: 'magic' } }), /solver\.start/);
  add(solve, 'start file missing (path relative to the config)', (b) => (b.solver = { ...b.solver, start: { type: 'file', path: 'no-such-solution.json' } }), /no-such-solution\.json: cannot read the file \(ENOENT\)/);
  add(solve, 'unknown cell key', (b) => (b.cell.nz = 8), /unknown field\(s\) "nz"/);
  add(train, 'Adam steps negative', (b) => (b.training.adamSteps = -5), /training\.adamSteps: got -5/);
  add(train, 'learning rate a string', (b) => (b.training.learningRate = 'fast'), /training\.learningRate: got "fast"/);
  add(train, 'loss weight 1e308', (b) => (b.losses = { weights: { mde: 1e308 } }), /losses\.weights\.mde: got 1e\+308/);
  add(train, 'loss weight negative', (b) => (b.losses = { weights: { gauge: -1 } }), /losses\.weights\.gauge: got -1/);
  add(train, 'unknown loss term', (b) => (b.losses = { weights: { energy: 1 } }), /unknown field\(s\) "energy"/);
  add(train, 'backend unknown', (b) => (b.backend = 'gpu'), /backend: got "gpu"/);
  add(train, 'initFrom not a checkpoint (named, relative to the config)', (b) => (b.initFrom = 'no-such-checkpoint'), /initFrom: .*no-such-checkpoint.*not a checkpoint directory.*train that one first/);
  add(train, 'system chain f missing', (b) => delete b.system.chain.f, /system\.chain\.f: got nothing \(missing\)/);
  add(surrogate, 'anchors below 2', (b) => (b.parameters.chiN.anchors = 1), /parameters\.chiN\.anchors: got 1/);
  add(surrogate, 'χN range reversed', (b) => (b.parameters.chiN = { min: 20, max: 12, anchors: 5 }), /parameters\.chiN/);
  add(surrogate, 'rounds a string', (b) => (b.training.rounds = 'ten'), /training\.rounds: got "ten"/);
  add(sweep, 'parameters χN as strings', (b) => (b.parameters = { ...b.parameters, chiN: ['10'] }), /parameters\.chiN: got \["10"\]; allowed: item 0: a number, or an object/);
  add(sweep, 'parameters count fractional', (b) => (b.parameters = { ...b.parameters, chiN: { from: 10, to: 12, count: 2.5 } }), /parameters\.chiN: got \{from: 10, to: 12, count: 2\.5\}; allowed: an array, or count: a whole number/);
  add(sweep, 'parameters f out of range', (b) => (b.parameters = { ...b.parameters, f: [1.5] }), /parameters\.f(\.0)?: got .*1\.5/);
  add(sweep, 'unknown key', (b) => (b.speed = 'max'), /unknown field\(s\) "speed"/);
  add(invert, 'period a word not allowed', (b) => (b.cell = { period: 'eq' }), /cell\.period: got "eq"; allowed: "equilibrium" or "free", or a number/);
  add(invert, 'method unknown', (b) => (b.method = 'bayes'), /method: got "bayes"/);
  add(invert, 'χN range reversed', (b) => (b.chiNRange = [40, 11]), /chiNRange: got \[40, 11\]/);
  add(invert, 'cell nx not a power of two', (b) => (b.cell = { nx: 48 }), /cell\.nx: got 48;.*power of two/);
  add(invert, 'units rgNm negative', (b) => (b.units = { rgNm: -2 }), /rgNm.*-2/);
  add(invert, 'seeds zero', (b) => (b.network = { seeds: 0 }), /network\.seeds: got 0/);
  return out;
}

/** A valid config with a byte-order mark runs and gives the same answer as without one. */
function bomRuns(): FaultCase[] {
  let plain = '';
  let bom = '';
  return [
    {
      group: 'config files',
      name: 'solve: a byte-order mark before a valid config is read past (same answer as without)',
      setup: (s) => {
        const c = smallSolveConfig();
        plain = s.json('plain.json', c);
        bom = s.write('bom.json', `\uFEFF${JSON.stringify(c)}`);
      },
      argv: () => ['solve', bom, '--json', '--quiet'],
      code: 0,
      check: async (r) => {
        const withBom = JSON.parse(r.stdout);
        expect(withBom.phase).toBe('lamellar');
        const without = JSON.parse((await runCli(['solve', plain, '--json', '--quiet'], { capture: true })).stdout);
        expect(withBom.freeEnergy).toBe(without.freeEnergy);
        expect(withBom.period).toBe(3.7);
      },
    },
  ];
}

/** A path in a config is read relative to the config's folder, not the working directory. */
function relativePaths(): FaultCase[] {
  let cfg = '';
  return [
    {
      group: 'config files',
      name: 'solve: solver.start.path relative to the config file warm-starts from the file beside it',
      setup: async (s) => {
        const first = await runCli(['solve', s.json('first.json', smallSolveConfig()), '--out', s.path('cfgdir/sol'), '--quiet'], { capture: true });
        expect(first.code, first.stderr).toBe(0);
        const c = smallSolveConfig() as Record<string, any>;
        c.solver = { ...c.solver, start: { type: 'file', path: 'sol/solution.json' } };
        cfg = s.json('cfgdir/c.json', c);
      },
      argv: () => ['solve', cfg, '--json', '--quiet'],
      code: 0,
      // Started from its own converged fields, the solve is done within a few iterations.
      check: (r) => expect(JSON.parse(r.stdout).iterations).toBeLessThan(5),
    },
  ];
}

export const CONFIG_CASES: FaultCase[] = [...KINDS.flatMap(fileFaults), ...fieldFaults(), ...bomRuns(), ...relativePaths()];

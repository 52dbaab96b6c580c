import { existsSync, mkdtempSync, readFileSync, writeFileSync, mkdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli as runInProcess } from '../../src/cli/run-cli.js';
import { runCli } from '../helpers/run-cli.js';

// Refusals, the warm start and the single-chain solve run the command line in this process
// (src/cli/run-cli.ts, as tests/faults does): a node start-up each cost more than they do. The
// runs that check what a user sees of a whole process (files, exit 3, start-up) run the built program.
const inProcess = (args: string[]) => runInProcess(args, { capture: true });

const tmp = () => mkdtempSync(join(tmpdir(), 'mesofield-cli-'));

function writeConfig(dir: string, cfg: unknown): string {
  const p = join(dir, 'cfg.json');
  writeFileSync(p, JSON.stringify(cfg));
  return p;
}

const baseConfig = { version: 2, kind: 'solve', system: { chain: { type: 'diblock', f: 0.5 }, chiN: 15 }, cell: { period: 3.75, nx: 32, ns: 60 } };

describe('mesofield solve', () => {
  it('prints a JSON summary with the documented fields and writes solution files', () => {
    const dir = tmp();
    const out = join(dir, 'run');
    const r = runCli(['solve', '--chiN', '15', '--f', '0.5', '--period', 'equilibrium', '--nx', '32', '--ns', '60', '--json', '--out', out]);
    expect(r.code).toBe(0);
    const s = JSON.parse(r.stdout);
    for (const k of ['period', 'freeEnergy', 'freeEnergyDisordered', 'Q', 'phase', 'iterations', 'residual', 'chiN', 'f']) expect(s).toHaveProperty(k);
    expect(s.phase).toBe('lamellar');
    expect(s.freeEnergy).toBeLessThan(s.freeEnergyDisordered);
    expect(r.stderr).toMatch(/period search/);
    const file = JSON.parse(readFileSync(join(out, 'solution.json'), 'utf8'));
    expect(file.kind).toBe('solution');
    expect(file.provenance.tool).toBe('mesofield');
    expect(file.config.system.chiN).toBe(15);
    const csv = readFileSync(join(out, 'profile.csv'), 'utf8').trim().split('\n');
    expect(csv[0]).toBe('x,phiA,phiB,wA,wB');
    expect(csv.length).toBe(33);
  });

  it('asymmetric chains solve with the default resolution and report the contour steps of each block', async () => {
    // The redesign's promise (f = 0.35, 0.333, 0.27 at χN = 22 with default settings): the
    // contour steps are chosen per block, and both outputs say which were used.
    for (const f of ['0.35', '0.333']) {
      const j = await inProcess(['solve', '--f', f, '--chiN', '22', '--json']);
      expect(j.code, j.stderr).toBe(0);
      const s = JSON.parse(j.stdout);
      expect(s.converged).toBe(true);
      expect(s.phase).toBe('lamellar');
      expect(s.contourSteps).toHaveLength(2);
      expect(s.contourSteps[0] + s.contourSteps[1]).toBe(s.ns);
      // The minority block is the shorter one: it gets fewer steps (same step size within rounding to even).
      expect(s.contourSteps[0]).toBeLessThan(s.contourSteps[1]);
    }
    // f = 0.27 from the text summary alone (one solve serves both outputs' checks): exit 0 is a
    // converged run (a run that does not converge exits 3, below).
    const t = await inProcess(['solve', '--f', '0.27', '--chiN', '22']);
    expect(t.code, t.stderr).toBe(0);
    expect(t.stdout).toMatch(/phase: lamellar/);
    const steps = /resolution: \d+ grid points, (\d+) contour steps \((\d+) \+ (\d+) per block\)/.exec(t.stdout);
    expect(steps, t.stdout).not.toBeNull();
    const [ns, a, b] = steps!.slice(1).map(Number);
    expect(a + b).toBe(ns);
    expect(a).toBeLessThan(b);
  });

  it('warm-starts from a previous solution file', async () => {
    const dir = tmp();
    const first = join(dir, 'first');
    expect((await inProcess(['solve', writeConfig(dir, baseConfig), '--out', first, '--quiet'])).code).toBe(0);
    const r = await inProcess(['solve', writeConfig(dir, baseConfig), '--start', join(first, 'solution.json'), '--json', '--quiet']);
    expect(r.code).toBe(0);
    expect(JSON.parse(r.stdout).iterations).toBeLessThan(5);
  });

  const bad: [string, string[], RegExp][] = [
    ['non-power-of-two nx', ['--nx', '100'], /cell\.nx: got 100;.*power of two/],
    ['too few contour steps', ['--ns', '3', '--f', '0.3'], /cell\.ns: got 3;/],
    ['f out of range', ['--f', '1.5'], /system\.chain\.f: got 1\.5;/],
    ['negative χN', ['--chiN', '-3'], /system\.chiN: got -3;/],
    ['zero period', ['--period', '0'], /cell\.period: got 0;/],
    ['non-numeric flag', ['--chiN', 'abc'], /--chiN: got "abc"; allowed: a number/],
    ['unknown chain', ['--chain', 'star'], /system\.chain\.type: got "star";/],
    ['equilibrium for a homopolymer', ['--chain', 'homopolymer'], /cell\.period: got "equilibrium"; a period search needs a chain with both A and B/],
  ];
  for (const [name, args, msg] of bad) {
    it(`bad input (${name}) exits 2 with a message naming the field and value`, async () => {
      const r = await inProcess(['solve', ...args, '--quiet']);
      expect(r.code).toBe(2);
      expect(r.stderr).toMatch(msg);
      expect(r.stdout).toBe('');
    });
  }

  it('bad config files: unknown field, bad JSON, missing file, wrong version', async () => {
    const dir = tmp();
    const unknown = await inProcess(['solve', writeConfig(dir, { ...baseConfig, colour: 'red' })]);
    expect(unknown.code).toBe(2);
    expect(unknown.stderr).toMatch(/unknown field\(s\) "colour"/);
    const p = join(dir, 'broken.json');
    writeFileSync(p, '{ "version": 2, ');
    expect((await inProcess(['solve', p])).stderr).toMatch(/not valid JSON/);
    expect((await inProcess(['solve', join(dir, 'nope.json')])).stderr).toMatch(/cannot read the file \(ENOENT\)/);
    const v = await inProcess(['solve', writeConfig(dir, { ...baseConfig, version: 7 })]);
    expect(v.code).toBe(2);
    expect(v.stderr).toMatch(/version: got 7/);
  });

  it('a failing run leaves an existing output directory untouched', async () => {
    const dir = tmp();
    const out = join(dir, 'keep');
    mkdirSync(out);
    writeFileSync(join(out, 'solution.json'), 'previous');
    const r = await inProcess(['solve', writeConfig(dir, { ...baseConfig, cell: { ...baseConfig.cell, nx: 12 } }), '--out', out]);
    expect(r.code).toBe(2);
    expect(readFileSync(join(out, 'solution.json'), 'utf8')).toBe('previous');
  });

  it('a non-converging run says so and exits 3', () => {
    const dir = tmp();
    const r = runCli(['solve', writeConfig(dir, { ...baseConfig, solver: { maxIterations: 2 } }), '--json']);
    expect(r.code).toBe(3);
    expect(r.stderr).toMatch(/did not converge/);
    expect(JSON.parse(r.stdout).converged).toBe(false);
  });

  it('homopolymer in a prescribed field is a single-chain problem', async () => {
    const dir = tmp();
    const cfg = { version: 2, kind: 'solve', system: { chain: { type: 'homopolymer' }, externalField: { A: { type: 'uniform', value: 0.7 } } }, cell: { period: 2, nx: 16, ns: 20 } };
    const r = await inProcess(['solve', writeConfig(dir, cfg), '--json']);
    expect(r.code).toBe(0);
    const s = JSON.parse(r.stdout);
    expect(s.phase).toBe('single-chain');
    // Analytic: Q = exp(−w) in a uniform field.
    expect(s.Q).toBeCloseTo(Math.exp(-0.7), 12);
  });
});

describe('mesofield spinodal', () => {
  it('prints Leibler’s values for the symmetric diblock', async () => {
    // Leibler, Macromolecules 13, 1602 (1980): (χN)_s = 10.495, q*Rg = 1.946.
    const r = await inProcess(['spinodal', '--f', '0.5', '--json']);
    expect(r.code).toBe(0);
    const s = JSON.parse(r.stdout);
    expect(s.chiNSpinodal).toBeCloseTo(10.495, 3);
    expect(s.qStarRg).toBeCloseTo(1.946, 3);
  });

  it('bad f exits 2', async () => {
    const r = await inProcess(['spinodal', '--f', '0']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/f: got 0;/);
  });
});

describe('start-up', () => {
  it('commands that do not train do not load tfjs', () => {
    const r = runCli(['spinodal', '--json']);
    expect(r.code).toBe(0);
    expect(existsSync(join(process.cwd(), 'dist/cli/main.js'))).toBe(true);
    const main = readFileSync(join(process.cwd(), 'dist/cli/main.js'), 'utf8');
    expect(main).not.toMatch(/@tensorflow/);
  });
});

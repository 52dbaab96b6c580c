import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { runCli as runInProcess } from '../../src/cli/run-cli.js';
import { runCli } from '../helpers/run-cli.js';

// The runs that make a result go through the built program as a user starts it; the bad-input
// cases (which stop before any fit, or after one fit on a small grid) run the same command line
// in this process (src/cli/run-cli.ts, as tests/faults does): a node start-up per case cost more
// than the cases themselves.
const inProcess = (args: string[]) => runInProcess(args, { capture: true });

const tmp = () => mkdtempSync(join(tmpdir(), 'mesofield-inverse-'));
const grid = ['--nx', '32', '--ns', '60'];
// Cases that fail after a fit (a bound reached, a period too long for the data): the failure is
// about the data's span or the search range, not the resolution, so the fit runs on a small grid.
const smallGrid = ['--nx', '16', '--ns', '20'];

function write(dir: string, name: string, text: string): string {
  const p = join(dir, name);
  writeFileSync(p, text);
  return p;
}

/** A clean synthetic profile over one period, from the CLI itself. */
function synth(dir: string, extra: string[] = []): string {
  const out = join(dir, 'synth');
  const r = runCli(['synth', '--f', '0.5', '--chiN', '15', '--offset', '0.6', ...grid, ...extra, '--out', out]);
  expect(r.code).toBe(0);
  return join(out, 'profile.csv');
}

/** One clean profile (χN = 15, offset 0.6) that the bad-input cases below share. */
let clean = '';
beforeAll(async () => {
  const out = join(tmp(), 'synth');
  const r = await inProcess(['synth', '--f', '0.5', '--chiN', '15', '--offset', '0.6', ...grid, '--out', out, '--quiet']);
  expect(r.code, r.stderr).toBe(0);
  clean = join(out, 'profile.csv');
});

describe('mesofield synth', () => {
  it('writes a seeded noisy profile that repeats exactly, with its truth in a sidecar', async () => {
    const dir = tmp();
    const a = synth(dir, ['--noise', '0.02', '--seed', '4', '--points', '48']);
    const first = readFileSync(a, 'utf8');
    const truth = JSON.parse(readFileSync(join(dirname(a), 'truth.json'), 'utf8'));
    expect(truth).toMatchObject({ kind: 'synth-truth', version: 2, chiN: 15, f: 0.5, noise: 0.02, seed: 4, points: 48, offset: 0.6 });
    expect(truth.period).toBeGreaterThan(3.6);
    const rows = first.trim().split('\n');
    expect(rows[0]).toBe('x,phiA,sigma');
    expect(rows.length).toBe(49);
    // The same seed in another run (this process, not the first one's) prints the same file.
    const again = await inProcess(['synth', '--f', '0.5', '--chiN', '15', '--offset', '0.6', ...grid, '--noise', '0.02', '--seed', '4', '--points', '48']);
    expect(again.code).toBe(0);
    expect(again.stdout).toBe(first);
    const other = await inProcess(['synth', '--f', '0.5', '--chiN', '15', '--offset', '0.6', ...grid, '--noise', '0.02', '--seed', '5', '--points', '48']);
    expect(other.stdout).not.toBe(first);
  });

  const bad: [string, string[], RegExp][] = [
    ['missing f', ['--chiN', '15'], /--f: missing/],
    ['f out of range', ['--f', '1', '--chiN', '15'], /--f: got 1;/],
    ['negative noise', ['--f', '0.5', '--chiN', '15', '--noise', '-0.1'], /--noise: got -0.1;/],
    ['non-integer seed', ['--f', '0.5', '--chiN', '15', '--seed', '1.5'], /--seed: got 1.5;/],
    ['one point', ['--f', '0.5', '--chiN', '15', '--points', '1'], /--points: got 1;/],
    ['bad nx', ['--f', '0.5', '--chiN', '15', '--nx', '48'], /cell\.nx: got 48;.*power of two/],
  ];
  for (const [name, args, msg] of bad) {
    it(`bad flag (${name}) exits 2 and writes nothing`, async () => {
      const dir = tmp();
      const out = join(dir, 'p');
      const r = await inProcess(['synth', ...args, '--out', out]);
      expect(r.code).toBe(2);
      expect(r.stderr).toMatch(msg);
      expect(existsSync(out)).toBe(false);
    });
  }
});

describe('mesofield invert', () => {
  it('recovers χN from a synthetic profile and writes result.json, fit.csv and solution.json', async () => {
    const dir = tmp();
    // The profile is set-up, made in this process (synth's process case is the one above); the invert is the built program's.
    const p = join(dir, 'synth', 'profile.csv');
    const made = await inProcess(['synth', '--f', '0.5', '--chiN', '15', '--offset', '0.6', ...grid, '--noise', '0.02', '--seed', '2', '--out', dirname(p), '--quiet']);
    expect(made.code, made.stderr).toBe(0);
    const out = join(dir, 'res');
    const r = runCli(['invert', p, '--f', '0.5', ...grid, '--json', '--out', out]);
    expect(r.code).toBe(0);
    const res = JSON.parse(r.stdout);
    expect(res.kind).toBe('inversion');
    expect(res.version).toBe(2); // inversion files are version 2 (io/formats/inversion.ts)
    expect(res.provenance.tool).toBe('mesofield');
    const c = res.estimators.classical;
    expect(Math.abs(c.chiN / 15 - 1)).toBeLessThan(0.02);
    expect(c.interval[0]).toBeLessThan(c.chiN);
    expect(c.interval95[1]).toBeGreaterThan(c.interval[1]);
    for (const k of ['offset', 'period', 'chi2', 'reducedChi2', 'n', 'p', 'sigma', 'seconds', 'profileLikelihood', 'fields', 'intervalMethod', 'points', 'fitCurve']) expect(c).toHaveProperty(k);
    expect(c.sigma.source).toBe('column');
    expect(res.agreement.compared).toBe(false);
    expect(res.assumptions.join(' ')).toMatch(/mean-field.*fluctuation/);
    expect(JSON.parse(readFileSync(join(out, 'result.json'), 'utf8')).estimators.classical.chiN).toBe(c.chiN);
    const fit = readFileSync(join(out, 'fit.csv'), 'utf8').trim().split('\n');
    expect(fit[0]).toBe('x,phiA,sigma,fit,residual');
    expect(fit.length).toBe(65);
    const [x, phi, sigma, fitted, residual] = fit[5].split(',').map(Number);
    expect(residual).toBeCloseTo(phi - fitted, 14);
    expect(sigma).toBe(0.02);
    expect(c.points.x[4]).toBe(x);
    expect(c.fitCurve.x.length).toBe(400);
    expect(c.fitCurve.x[0]).toBe(0);
    const sol = JSON.parse(readFileSync(join(out, 'solution.json'), 'utf8'));
    expect(sol.kind).toBe('solution');
    expect(sol.system.chiN).toBe(c.chiN);
  });

  it('reads x in nm with --rg-nm or --segments/--segment-length-nm, and a config file with flags on top', async () => {
    const dir = tmp();
    // Rg = 0.7·sqrt(96/6) = 2.8 nm.
    const p = join(dir, 'nm', 'profile.csv');
    expect((await inProcess(['synth', '--f', '0.5', '--chiN', '15', ...grid, '--rg-nm', '2.8', '--out', dirname(p), '--quiet'])).code).toBe(0);
    // Without --json: the text summary on stdout (it states the assumptions too), the result in --out.
    const text = await inProcess(['invert', p, '--f', '0.5', ...grid, '--rg-nm', '2.8', '--out', join(dir, 'nm-res'), '--quiet']);
    expect(text.code, text.stderr).toBe(0);
    expect(text.stdout).toMatch(/χN = .*\n.*68\.3% interval/);
    expect(text.stdout).toMatch(/mean-field SCFT: no fluctuation corrections/);
    const a = JSON.parse(readFileSync(join(dir, 'nm-res', 'result.json'), 'utf8')).estimators.classical;
    expect(Math.abs(a.chiN / 15 - 1)).toBeLessThan(1e-4);
    expect(a.periodNm).toBeCloseTo(a.period * 2.8, 10);
    const cfg = write(dir, 'cfg.json', JSON.stringify({ version: 2, kind: 'invert', system: { chain: { type: 'diblock', f: 0.5 } }, cell: { nx: 32, ns: 60 }, units: { segments: 96, segmentLengthNm: 0.7 }, chiNRange: [11, 30] }));
    const r = await inProcess(['invert', p, cfg, '--json', '--quiet']);
    expect(r.code).toBe(0);
    const b = JSON.parse(r.stdout);
    expect(Math.abs(b.estimators.classical.chiN / 15 - 1)).toBeLessThan(1e-4);
    expect(b.input.units.rgNm).toBeCloseTo(2.8, 12);
    expect(b.estimators.classical.chiNRange).toEqual([11, 30]);
  });

  it('bad network settings exit 2 naming the field, and write nothing', async () => {
    const dir = tmp();
    const p = clean;
    const out = join(dir, 'out-net');
    const r = await inProcess(['invert', p, '--f', '0.5', '--method', 'network', '--seeds', '0', '--out', out]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/network\.seeds: got 0;/);
    const b = await inProcess(['invert', p, '--f', '0.5', '--method', 'both', '--backend', 'gpu', '--out', out]);
    expect(b.code).toBe(2);
    expect(b.stderr).toMatch(/network\.backend: got "gpu";/);
    // A budget of the strategy not run is refused, not ignored: the flag (the default strategy is least-squares) …
    const c = await inProcess(['invert', p, '--f', '0.5', '--method', 'network', '--adam-steps', '500', '--out', out]);
    expect(c.code).toBe(2);
    expect(c.stderr).toMatch(/--adam-steps → network\.adamSteps: got 500; allowed only with network\.strategy "adam-lbfgs", and this run's strategy is "least-squares" \(the default/);
    // … and the config file's key, with the other strategy chosen by flag.
    const cfg = join(dir, 'net.json');
    writeFileSync(cfg, JSON.stringify({ version: 2, kind: 'invert', system: { chain: { type: 'diblock', f: 0.5 } }, network: { dataWeight: 3 } }));
    const d = await inProcess(['invert', p, cfg, '--method', 'network', '--strategy', 'adam-lbfgs', '--out', out]);
    expect(d.code).toBe(2);
    expect(d.stderr).toMatch(/net\.json: network\.dataWeight: got 3; allowed only with network\.strategy "least-squares", and this run's strategy is "adam-lbfgs"/);
    const e = await inProcess(['invert', p, '--f', '0.5', '--method', 'network', '--strategy', 'lbfgs', '--out', out]);
    expect(e.code).toBe(2);
    expect(e.stderr).toMatch(/--strategy → network\.strategy: got "lbfgs"/);
    expect(existsSync(out)).toBe(false);
  });

  const header = 'x,phiA,sigma\n';
  const rows = (n: number, fn: (i: number) => string) => Array.from({ length: n }, (_, i) => fn(i)).join('\n');
  const good = (i: number) => `${(i * 0.1).toFixed(2)},${(0.5 + 0.4 * Math.cos(i * 0.6)).toFixed(4)},0.02`;
  const badCsv: [string, string, string[], RegExp][] = [
    ['non-numeric value', `${header}${rows(10, good)}\n1.00,abc,0.02\n`, [], /line 12, column 2 \(phiA\): got "abc"; allowed: a finite number/],
    ['missing value', `${header}${rows(5, good)}\n0.50,,0.02\n`, [], /line 7, column 2 \(phiA\): missing value/],
    ['short row', `${header}${rows(5, good)}\n0.50,0.3\n`, [], /line 7, column 3 \(sigma\): missing value/],
    ['unsorted x', `${header}${rows(5, good)}\n0.30,0.5,0.02\n`, [], /line 7, column 1 \(x\): got 0\.30 after 0\.4 on line 6; x must increase strictly/],
    ['repeated x', `${header}${rows(5, good)}\n0.40,0.5,0.02\n`, [], /line 7, column 1 \(x\): got 0\.40, the same x as line 6/],
    ['value far outside [0, 1]', `${header}${rows(5, good)}\n0.50,1.3,0.02\n`, [], /line 7, column 2 \(phiA\): got 1\.3; a volume fraction lies in \[0, 1\].*5 × its sigma 0\.02/],
    ['outside [0, 1] without sigma', `x,phiA\n${rows(20, (i) => `${i * 0.1},${0.5 + 0.3 * Math.cos(0.3 * i)}`)}\n2.0,-0.4\n`, [], /line 22, column 2 \(phiA\): got -0\.4; a volume fraction lies in \[0, 1\].*estimated from the data/],
    ['non-positive sigma', `${header}0,0.5,0\n`, [], /line 2, column 3 \(sigma\): got 0; allowed: a standard deviation > 0/],
    ['no header', `${rows(5, good)}\n`, [], /line 1, column 1 \("0\.00"\): the first line must be a header row/],
    ['unknown column', `x,phi,sigma\n${rows(5, good)}\n`, [], /line 1, column 2 \("phi"\): unknown column; allowed columns: x or x_nm or x_Rg, phiA/],
    ['fewer points than unknowns', `${header}0,0.9,0.02\n0.5,0.1,0.02\n`, [], /2 data point\(s\), but the fit has 2 unknowns \(χN and the offset\).*at least 3 points/],
    ['fewer points than unknowns (free period)', `${header}0,0.9,0.02\n0.5,0.1,0.02\n1.0,0.9,0.02\n`, ['--period', 'free'], /3 data point\(s\), but the fit has 3 unknowns \(χN, the offset and the period\)/],
    ['empty file', '', [], /the file is empty/],
  ];
  for (const [name, text, extra, msg] of badCsv) {
    it(`bad profile (${name}) exits 2, names the line and column, writes nothing`, async () => {
      const dir = tmp();
      const p = write(dir, 'bad.csv', text);
      const out = join(dir, 'res');
      const r = await inProcess(['invert', p, '--f', '0.5', ...grid, ...extra, '--out', out]);
      expect(r.code).toBe(2);
      expect(r.stderr).toMatch(msg);
      expect(r.stdout).toBe('');
      expect(existsSync(out)).toBe(false);
    });
  }

  it('bad flags and periods that do not fit the x range exit 2 and write nothing', async () => {
    const dir = tmp();
    const one = clean;
    const shortProfile = join(dir, 'short', 'profile.csv');
    // 0.4 of a period: no period can be fixed from it, and the equilibrium one is over twice its span.
    expect((await inProcess(['synth', '--f', '0.5', '--chiN', '15', ...grid, '--periods', '0.4', '--points', '30', '--noise', '0.01', '--out', dirname(shortProfile), '--quiet'])).code).toBe(0);
    const cases: [string, string[], RegExp][] = [
      ['given period longer than twice the span', [one, '--period', '9'], /--period: got 9 Rg, more than twice the data span .*less than half a period/],
      ['given period in nm', [one, '--period', '30', '--rg-nm', '2'], /--period: got 30 nm, more than twice the data span/],
      ['free period runs to its bound', [shortProfile, '--period', 'free'], /--period: got "free", and the best period runs to the bound of its search/],
      ['equilibrium period over twice the span', [shortProfile], /--period: the fitted equilibrium period .* more than twice the data span/],
      ['missing f', [one, '--nx', '32'], /--f: missing; the A fraction f/],
      ['f out of range', [one, '--f', '1.5'], /--f → system\.chain\.f: got 1\.5;/],
      ['bad chiN range', [one, '--f', '0.5', '--chiN-range', '20,10'], /--chiN-range: got "20,10"; allowed: 0 < lo < hi/],
      ['non-numeric chiN range', [one, '--f', '0.5', '--chiN-range', 'a,b'], /--chiN-range: got "a,b"; allowed: two numbers lo,hi/],
      ['range that excludes the fit', [one, '--f', '0.5', '--chiN-range', '20,40'], /--chiN-range: the best fit runs to the lower bound χN = 20/],
      ['bad period word', [one, '--f', '0.5', '--period', 'stressfree'], /--period: got "stressfree"; allowed: a period in Rg \(a number > 0\), or "equilibrium", "free"/],
      ['bad nx', [one, '--f', '0.5', '--nx', '48'], /--nx → cell\.nx: got 48;.*power of two/],
      ['Rg given twice', [one, '--f', '0.5', '--rg-nm', '2', '--segments', '100'], /--rg-nm: give either --rg-nm or --segments/],
      ['segments without a length', [one, '--f', '0.5', '--segments', '100'], /--segment-length-nm: missing/],
      ['missing profile', [join(dir, 'nope.csv'), '--f', '0.5'], /nope\.csv: cannot read the file \(ENOENT\)/],
    ];
    for (const [name, args, msg] of cases) {
      const out = join(dir, `res-${name.replace(/\W+/g, '-')}`);
      const withF = args.includes('--f') || name === 'missing f' ? args : [...args, '--f', '0.5'];
      const r = await inProcess(['invert', ...withF, ...(args.includes('--nx') ? [] : smallGrid), '--out', out, '--quiet']);
      expect(r.code, name).toBe(2);
      expect(r.stderr, name).toMatch(msg);
      expect(existsSync(out), name).toBe(false);
    }
  });

  it('bad config files: unknown field, wrong kind, bad JSON', async () => {
    const dir = tmp();
    const p = clean;
    const base = { version: 2, kind: 'invert', system: { chain: { type: 'diblock', f: 0.5 } } };
    const unknown = await inProcess(['invert', p, write(dir, 'u.json', JSON.stringify({ ...base, colour: 'red' }))]);
    expect(unknown.code).toBe(2);
    expect(unknown.stderr).toMatch(/u\.json: \(top level\): unknown field\(s\) "colour"/);
    const kind = await inProcess(['invert', p, write(dir, 'k.json', JSON.stringify({ ...base, kind: 'solve' }))]);
    expect(kind.stderr).toMatch(/k\.json: kind: got "solve"/);
    const chiN = await inProcess(['invert', p, write(dir, 'c.json', JSON.stringify({ ...base, system: { ...base.system, chiN: 15 } }))]);
    expect(chiN.stderr).toMatch(/c\.json: system: unknown field\(s\) "chiN"/);
    const method = await inProcess(['invert', p, write(dir, 'm.json', JSON.stringify({ ...base, method: 'neural' }))]);
    expect(method.stderr).toMatch(/m\.json: method: got "neural"/);
    expect((await inProcess(['invert', p, write(dir, 'b.json', '{ "version": 2,')])).stderr).toMatch(/b\.json: not valid JSON/);
  });
});

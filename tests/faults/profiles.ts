/**
 * Profile CSVs for `invert`, broken in the ways measured data are: missing or non-numeric
 * values, repeated or unsorted x, too few points, decimal commas, semicolons, tabs, a wrong
 * header, fractions outside [0, 1], bad sigma, a folder, and a 100 000-row file with one bad
 * value at its end (the reader must reach it and name the line).
 */
import { expect } from 'vitest';
import { runCli } from '../../src/cli/run-cli.js';
import type { FaultCase, Sandbox } from './harness.js';

/** A parseable profile (a cosine over one period of 3.7 Rg, 24 points): config faults are found before it is read. */
export const PROFILE_CSV = `x,phiA\n${Array.from({ length: 24 }, (_, i) => `${((3.7 * i) / 24).toFixed(6)},${(0.5 + 0.4 * Math.cos((2 * Math.PI * i) / 24)).toFixed(6)}`).join('\n')}\n`;

const rows = (pairs: [string, string][], header = 'x,phiA') => `${header}\n${pairs.map((p) => p.join(',')).join('\n')}\n`;
const good: [string, string][] = PROFILE_CSV.trim().split('\n').slice(1).map((l) => l.split(',') as [string, string]);
const withRow = (i: number, row: [string, string]) => rows(good.map((r, j) => (j === i ? row : r)));

function csvCase(name: string, text: string | ((s: Sandbox) => string), message: RegExp, extra: string[] = []): FaultCase {
  let p = '';
  return {
    group: 'profile CSVs',
    name,
    setup: (s) => void (p = typeof text === 'string' ? s.write('p.csv', text) : text(s)),
    argv: () => ['invert', p, '--f', '0.5', '--nx', '16', '--ns', '20', '--quiet', ...extra],
    code: 2,
    message,
  };
}

const many = () => {
  const lines = ['x,phiA'];
  for (let i = 0; i < 100_000; i++) lines.push(`${(i * 1e-3).toFixed(3)},${(0.5 + 0.4 * Math.cos((2 * Math.PI * i * 1e-3) / 3.7)).toFixed(6)}`);
  lines[100_000] = '99.999,abc';
  return `${lines.join('\n')}\n`;
};

export const CSV_CASES: FaultCase[] = [
  csvCase('NaN value', withRow(3, [good[3][0], 'NaN']), /line 5, column 2 \(phiA\): got "NaN"; allowed: a finite number/),
  csvCase('lower-case nan', withRow(3, [good[3][0], 'nan']), /line 5, column 2 \(phiA\): got "nan"/),
  csvCase('Infinity', withRow(2, [good[2][0], 'Infinity']), /line 4, column 2 \(phiA\): got "Infinity"/),
  csvCase('1e999 (overflows)', withRow(2, [good[2][0], '1e999']), /line 4, column 2 \(phiA\): got "1e999"; allowed: a finite number/),
  csvCase('empty value', withRow(4, [good[4][0], '']), /line 6, column 2 \(phiA\): missing value/),
  csvCase('text value', withRow(4, ['abc', good[4][1]]), /line 6, column 1 \(x\): got "abc"/),
  csvCase('hex value', withRow(4, [good[4][0], '0x1']), /line 6, column 2 \(phiA\): got "0x1"/),
  csvCase('repeated x', withRow(5, [good[4][0], good[5][1]]), /line 7, column 1 \(x\): got .*the same x as line 6/),
  csvCase('unsorted x', withRow(5, ['0.01', good[5][1]]), /line 7, column 1 \(x\): got 0\.01 after .* x must increase strictly/),
  csvCase('two points', rows(good.slice(0, 2)), /2 data point\(s\).*give at least 3 points/),
  csvCase('one point', rows(good.slice(0, 1)), /1 data point/),
  csvCase('header only', 'x,phiA\n', /no data|0 data point/),
  csvCase('empty file', '', /p\.csv/),
  csvCase('decimal commas', rows(good.map(([x, y]) => [x.replace('.', ','), y.replace('.', ',')] as [string, string])), /p\.csv: line 2/),
  csvCase('semicolons', good.reduce((t, [x, y]) => `${t}${x};${y}\n`, 'x;phiA\n'), /p\.csv: line 1/),
  csvCase('tabs', good.reduce((t, [x, y]) => `${t}${x}\t${y}\n`, 'x\tphiA\n'), /p\.csv: line 1/),
  csvCase('no header', rows(good).split('\n').slice(1).join('\n'), /p\.csv: line 1/),
  csvCase('no phiA column', rows(good, 'x,phiB'), /p\.csv: line 1.*phiB|the header has no phiA column/),
  csvCase('column named twice', rows(good.map(([x, y]) => [x, `${y},${y}`] as [string, string]), 'x,phiA,phiA'), /column named twice/),
  csvCase('a value missing in a row', `${rows(good)}4.0\n`, /line 26/),
  csvCase('an extra value in a row', `${rows(good)}4.0,0.5,0.1\n`, /line 26.*extra value/),
  csvCase('percentages, not fractions', rows(good.map(([x, y]) => [x, String(Number(y) * 100)] as [string, string])), /phiA\): got .*a volume fraction lies in \[0, 1\]/),
  csvCase('sigma zero', rows(good.map(([x, y]) => [x, `${y},0`] as [string, string]), 'x,phiA,sigma'), /\(sigma\): got 0; allowed: a standard deviation > 0/),
  csvCase('sigma negative', rows(good.map(([x, y]) => [x, `${y},-0.01`] as [string, string]), 'x,phiA,sigma'), /\(sigma\): got -0\.01; allowed: a standard deviation > 0/),
  csvCase('100 000 rows with a bad value in the last', many(), /line 100001, column 2 \(phiA\): got "abc"/),
  csvCase('a folder', (s) => s.mkdir('p.csv'), /p\.csv: cannot read the file \(EISDIR\)/),
  csvCase('missing file', (s) => s.path('nope.csv'), /nope\.csv: cannot read the file \(ENOENT\)/),
  csvCase('--rg-nm with --segments (two answers to one question)', PROFILE_CSV, /--rg-nm: give either --rg-nm or --segments/, ['--rg-nm', '2', '--segments', '96', '--segment-length-nm', '0.7']),
  csvCase('--segments without --segment-length-nm', PROFILE_CSV, /--segment-length-nm: missing/, ['--segments', '96']),
];

/**
 * Read-past cases: a byte-order mark and Windows line endings change nothing about the answer.
 * One synthetic profile and its plain inversion serve both cases (made once, outside the sandboxes).
 */
const grid = ['--nx', '16', '--ns', '20'];
let plainRun: Promise<{ csv: string; chiN: number }> | undefined;
const plainInversion = () =>
  (plainRun ??= (async () => {
    const { mkdtempSync } = await import('node:fs');
    const { tmpdir } = await import('node:os');
    const { join } = await import('node:path');
    const dir = mkdtempSync(join(tmpdir(), 'mesofield-plain-'));
    const r = await runCli(['synth', '--f', '0.5', '--chiN', '15', '--points', '24', ...grid, '--out', join(dir, 'synth')], { capture: true });
    expect(r.code).toBe(0);
    const csv = join(dir, 'synth', 'profile.csv');
    const plain = await runCli(['invert', csv, '--f', '0.5', ...grid, '--json', '--quiet'], { capture: true });
    expect(plain.code).toBe(0);
    return { csv, chiN: JSON.parse(plain.stdout).estimators.classical.chiN as number };
  })());

function sameAnswer(name: string, edit: (csv: string) => string): FaultCase {
  let edited = '';
  return {
    group: 'profile CSVs',
    name,
    setup: async (s) => {
      const { readFileSync } = await import('node:fs');
      edited = s.write('edited.csv', edit(readFileSync((await plainInversion()).csv, 'utf8')));
    },
    argv: () => ['invert', edited, '--f', '0.5', ...grid, '--json', '--quiet'],
    code: 0,
    check: async (r) => {
      const a = JSON.parse(r.stdout).estimators.classical.chiN;
      const b = (await plainInversion()).chiN;
      expect(a).toBe(b);
      // The profile is noiseless and made on the same grid: χN comes back to the truth (synth's own χN = 15).
      expect(Math.abs(a - 15)).toBeLessThan(1e-3);
    },
  };
}

/** The unit trap: a profile with x in nm (Rg = 4 nm) and no unit named, read as Rg: refused, naming --rg-nm. */
const nmTrap: FaultCase = {
  group: 'profile CSVs',
  name: 'x in nm read as Rg (no unit given): refused, naming --rg-nm',
  setup: async (s) => {
    const r = await runCli(['synth', '--f', '0.5', '--chiN', '15', '--points', '48', '--periods', '2', '--nx', '16', '--ns', '20', '--out', s.path('synth')], { capture: true });
    expect(r.code).toBe(0);
    const { readFileSync } = await import('node:fs');
    const [head, ...body] = readFileSync(s.path('synth/profile.csv'), 'utf8').trim().split('\n');
    s.write('nm.csv', `${head}\n${body.map((l) => l.split(',')).map(([x, ...rest]) => [String(4 * Number(x)), ...rest].join(',')).join('\n')}\n`);
  },
  argv: (s) => ['invert', s.path('nm.csv'), '--f', '0.5', '--nx', '16', '--ns', '20', '--quiet'],
  code: 2,
  message: /nm\.csv: x is read in Rg \(no unit given\), but the data's period is .* The units of x look wrong: if x is in nm, give --rg-nm R/,
};

/**
 * A long valid profile is fitted in seconds (it took minutes when every trial offset summed
 * over every point, and most of its time went to the data's periodogram until that screened
 * long even grids): the answer is synth's own χN (noise-free data on the same grid). 25 000
 * rows, not 100 000: long enough for both long-profile paths (the offset fit through the data's
 * moments; the periodogram's screen, from 4096 points on) and 1000 times the other profiles
 * here, at a quarter of the time; the reader's own size check stays at 100 000 rows (the case
 * with a bad value in the last row, which reads every row before it).
 */
const longProfile: FaultCase = {
  group: 'profile CSVs',
  name: 'a valid 25 000-row profile: fitted, χN back to the truth',
  setup: async (s) => {
    const r = await runCli(['synth', '--f', '0.5', '--chiN', '15', '--points', '25000', '--periods', '3', '--nx', '16', '--ns', '20', '--out', s.path('synth')], { capture: true });
    expect(r.code).toBe(0);
  },
  argv: (s) => ['invert', s.path('synth/profile.csv'), '--f', '0.5', '--nx', '16', '--ns', '20', '--json', '--quiet'],
  code: 0,
  check: (r) => {
    const out = JSON.parse(r.stdout);
    expect(out.input.n).toBe(25000);
    expect(Math.abs(out.estimators.classical.chiN - 15)).toBeLessThan(1e-3);
  },
};

export const CSV_ANSWER_CASES: FaultCase[] = [
  longProfile,
  nmTrap,
  sameAnswer('byte-order mark', (t) => `\uFEFF${t}`), sameAnswer('Windows line endings', (t) => t.replace(/\n/g, '\r\n'))];

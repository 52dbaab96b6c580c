/**
 * Output paths: a run writes only into a new or empty directory or a previous output of the
 * same command (with --overwrite), never deletes what it did not write, refuses a second
 * writer, and a failed run leaves a good result in place. Root can write anywhere, so
 * "read-only" is made with a path under a file (ENOTDIR), which fails for root too.
 */
import { existsSync, readFileSync, symlinkSync } from 'node:fs';
import { hostname } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { expect } from 'vitest';
import { runCli } from '../../src/cli/run-cli.js';
import type { FaultCase, Sandbox } from './harness.js';
import { smallSolveConfig } from './config-cases.js';

const SOLVE = ['solve', '--chiN', '15', '--period', '3.7', '--nx', '16', '--ns', '20', '--quiet'];
const SYNTH = ['synth', '--f', '0.5', '--chiN', '15', '--period', '3.7', '--nx', '16', '--ns', '20', '--points', '8'];

/** A film's R(Q) on a small grid at few Q points: seconds. */
const REFLECTIVITY = ['reflectivity', '--f', '0.5', '--film', '20', '--affinity', '1,-0.6', '--rg-nm', '5', '--sld', '6.0,1.0,2.07,0', '--nx', '16', '--ns', '20', '--points', '20', '--quiet'];

async function previous(s: Sandbox, argv: string[], dir: string): Promise<void> {
  const r = await runCli([...argv, '--out', s.path(dir)], { capture: true });
  expect(r.code, r.stderr).toBe(0);
}

const refused = (name: string, setup: FaultCase['setup'], argv: (s: Sandbox) => string[], message: RegExp): FaultCase => ({ group: 'output paths', name, setup, argv, code: 2, message });

/** Each command that writes a directory, refusing a folder that holds someone's notes. */
const perCommand: [string, (s: Sandbox) => string[]][] = [
  ['solve', () => SOLVE],
  ['synth', () => SYNTH],
  ['invert', (s) => ['invert', s.write('p.csv', 'x,phiA\n0,0.9\n1,0.5\n2,0.1\n3,0.5\n'), '--f', '0.5', '--quiet']],
  ['train', (s) => ['train', s.json('t.json', { version: 2, kind: 'train', system: { chain: { type: 'diblock', f: 0.5 }, chiN: 15 } }), '--quiet']],
  ['sweep', (s) => ['sweep', s.json('sw.json', { version: 2, kind: 'sweep', system: { chain: { type: 'diblock' } }, parameters: { chiN: [14], f: [0.5], segmentRatio: [1] }, cell: { period: 3.7, nx: 16, ns: 20 } }), '--workers', '1', '--quiet']],
  ['predict', (s) => ['predict', s.mkdir('ck'), '--chiN', '15', '--quiet']],
  ['demo', () => ['demo', '--quiet']],
  // A surrogate config goes to `train` too; its checkpoint folder is claimed like a network run's.
  ['train (surrogate config)', (s) => ['train', s.json('su.json', JSON.parse(readFileSync(join(CONFIGS, 'diblock-chiN12-20.surrogate.json'), 'utf8'))), '--quiet']],
  ['sweep --merge', (s) => ['sweep', '--merge', s.mkdir('shards'), '--quiet']],
  ['fit-scattering', (s) => ['fit-scattering', s.path('i.csv'), '--f', '0.5', '--temperatures', '400', '--segments', '200', '--nbar', '1000', '--quiet']],
];

const CONFIGS = join(dirname(fileURLToPath(import.meta.url)), '..', '..', 'configs');

const notes = (s: Sandbox) => {
  s.mkdir('D/sub');
  s.write('D/notes.txt', 'my notes\n');
  s.write('D/sub/data.csv', '1,2\n');
};

export const OUTPUT_CASES: FaultCase[] = [
  ...perCommand.map(([cmd, argv]) => refused(`${cmd} --out a folder with other files`, notes, (s) => [...argv(s), '--out', s.path('D')], /--out .*D: is not empty and was not written by mesofield \(it holds notes\.txt, sub\)/)),
  ...perCommand.map(([cmd, argv]) =>
    refused(`${cmd} --out an existing file`, (s) => void s.write('F', 'precious\n'), (s) => [...argv(s), '--out', s.path('F')], /--out .*F: is a file, not a directory/),
  ),
  ...perCommand.map(([cmd, argv]) =>
    refused(`${cmd} --out a path under a file (no write possible, even for root)`, (s) => void s.write('F', 'precious\n'), (s) => [...argv(s), '--out', s.path('F/sub')], /--out: cannot use .*F\/sub: a part of the path is a file, not a folder \(ENOTDIR\)/),
  ),
  refused('solve --out "" (empty)', undefined, () => [...SOLVE, '--out', ''], /--out: got "" \(empty\)/),
  refused('solve --out . (the working directory)', undefined, () => [...SOLVE, '--out', '.'], /--out: got "\.", the current directory or one above it/),
  refused('solve --out .. (above the working directory)', undefined, () => [...SOLVE, '--out', '..'], /--out: got "\.\.", the current directory or one above it/),
  refused('solve --out /', undefined, () => [...SOLVE, '--out', '/'], /--out: got "\/", the current directory or one above it/),
  refused(
    'solve --out a symbolic link to a folder',
    (s) => {
      s.mkdir('real');
      symlinkSync(s.path('real'), s.path('link'));
    },
    (s) => [...SOLVE, '--out', s.path('link')],
    /link: is a symbolic link; allowed: a real directory \(give its target, .*real, if that is meant\)/,
  ),
  refused(
    'solve --out a dangling symbolic link',
    (s) => symlinkSync(s.path('nowhere'), s.path('link')),
    (s) => [...SOLVE, '--out', s.path('link')],
    /link: is a symbolic link/,
  ),
  refused('solve --out a previous solve output without --overwrite', (s) => previous(s, SOLVE, 'D'), (s) => [...SOLVE, '--out', s.path('D')], /D: holds a previous solve output; give --overwrite to replace it/),
  refused('solve --out a previous synth output, even with --overwrite', (s) => previous(s, SYNTH, 'D'), (s) => [...SOLVE, '--out', s.path('D'), '--overwrite'], /D: holds the output of mesofield synth/),
  refused('synth --out a previous synth output without --overwrite', (s) => previous(s, SYNTH, 'D'), (s) => [...SYNTH, '--out', s.path('D')], /D: holds a previous synth output/),
  refused(
    'train --out a previous training without --resume or --overwrite',
    (s) => {
      // A checkpoint folder as older versions wrote it (no marker): still recognised as train's.
      s.mkdir('ck');
      s.write('ck/checkpoint.json', '{"kind":"checkpoint"}');
      s.write('ck/weights.bin', 'w');
    },
    (s) => ['train', s.json('t.json', { version: 2, kind: 'train', system: { chain: { type: 'diblock', f: 0.5 }, chiN: 15 } }), '--out', s.path('ck'), '--quiet'],
    /ck: holds a previous train output; give --overwrite/,
  ),
  refused(
    'a second writer while another run holds the folder',
    (s) => {
      s.mkdir('D');
      // The lock of a live run (this test process itself stands in for it).
      s.write('D/.mesofield-lock', JSON.stringify({ pid: process.pid, host: hostname(), command: 'solve', startedAt: new Date().toISOString() }));
    },
    (s) => [...SOLVE, '--out', s.path('D')],
    /D: in use by another mesofield run \(solve, pid \d+/,
  ),
  {
    group: 'output paths',
    name: 'a stale lock (its process is gone) is taken over and the run succeeds',
    setup: (s) => {
      s.mkdir('D');
      s.write('D/.mesofield-lock', JSON.stringify({ pid: 2 ** 22 + 12345, host: hostname(), command: 'solve', startedAt: '2020-01-01T00:00:00Z' }));
    },
    argv: (s) => [...SOLVE, '--out', s.path('D'), '--json'],
    code: 0,
    mayChange: ['D/.mesofield-lock'],
    check: (_r, s) => {
      expect(existsSync(s.path('D/solution.json'))).toBe(true);
      expect(existsSync(s.path('D/.mesofield-lock'))).toBe(false);
    },
  },
  {
    group: 'output paths',
    name: '--overwrite replaces a previous output and keeps files mesofield did not write',
    setup: async (s) => {
      await previous(s, [...SOLVE, '--propagators'], 'D');
      s.write('D/notes.txt', 'mine\n');
    },
    argv: (s) => [...SOLVE.map((a) => (a === '15' ? '16' : a)), '--out', s.path('D'), '--overwrite'],
    code: 0,
    mayChange: ['D/solution.json', 'D/profile.csv', 'D/propagators.csv', 'D/.mesofield-output.json'],
    check: (_r, s) => {
      expect(readFileSync(s.path('D/notes.txt'), 'utf8')).toBe('mine\n');
      expect(JSON.parse(readFileSync(s.path('D/solution.json'), 'utf8')).system.chiN).toBe(16);
      // The previous run's propagators belong to χN = 15: a stale file of ours is removed, not left to mislead.
      expect(existsSync(s.path('D/propagators.csv'))).toBe(false);
    },
  },
  {
    // The refusal of a previous output names --overwrite: every command that writes takes it (reflectivity did not).
    group: 'output paths',
    name: 'reflectivity --overwrite replaces a previous reflectivity output and keeps files mesofield did not write',
    setup: async (s) => {
      await previous(s, [...REFLECTIVITY, '--chiN', '16'], 'R');
      s.write('R/notes.txt', 'mine\n');
    },
    argv: (s) => [...REFLECTIVITY, '--chiN', '17', '--out', s.path('R'), '--overwrite'],
    code: 0,
    mayChange: ['R/reflectivity.csv', 'R/sld-profile.csv', 'R/result.json', 'R/.mesofield-output.json'],
    check: (_r, s) => {
      expect(readFileSync(s.path('R/notes.txt'), 'utf8')).toBe('mine\n');
      expect(JSON.parse(readFileSync(s.path('R/result.json'), 'utf8')).settings.chiN).toBe(17);
    },
  },
  {
    group: 'output paths',
    name: 'a failed solve leaves the good result in place and puts its files in DIR.failed',
    setup: (s) => previous(s, SOLVE, 'D'),
    argv: (s) => {
      const c = smallSolveConfig() as Record<string, any>;
      c.solver = { ...c.solver, maxIterations: 3 };
      return ['solve', s.json('c.json', c), '--out', s.path('D'), '--overwrite', '--quiet'];
    },
    code: 3,
    message: /solve did not converge: .*the failed run's files are in .*D\.failed \(.*D was left as it was\)/,
    check: (_r, s) => {
      expect(JSON.parse(readFileSync(s.path('D/solution.json'), 'utf8')).summary.converged).toBe(true);
      expect(JSON.parse(readFileSync(s.path('D.failed/solution.json'), 'utf8')).summary.converged).toBe(false);
    },
  },
  refused(
    'bragg-pattern --out a folder with other files',
    async (s) => {
      await previous(s, SOLVE, 'sol');
      notes(s);
    },
    (s) => ['bragg-pattern', s.path('sol/solution.json'), '--orders', '3', '--out', s.path('D')],
    /--out .*D: is not empty and was not written by mesofield \(it holds notes\.txt, sub\)/,
  ),
  refused(
    'sweep --merge --out a solve output (another command\'s)',
    (s) => previous(s, SOLVE, 'D'),
    (s) => ['sweep', '--merge', s.mkdir('shards'), '--out', s.path('D'), '--quiet'],
    /--out .*D: holds the output of mesofield solve; allowed: a new or empty directory, or a previous sweep output/,
  ),
  {
    group: 'output paths',
    name: 'train --overwrite of a previous train output, refused after the claim (disordered reference): the previous output is untouched',
    setup: (s) => {
      // A previous train output as the marker describes it (its files are the tool's): bytes to compare.
      s.mkdir('D');
      s.write('D/checkpoint.json', '{"kind":"checkpoint","previous":true}\n');
      s.write('D/weights.bin', new Uint8Array([1, 2, 3, 4]));
      s.write('D/.mesofield-output.json', `${JSON.stringify({ tool: 'mesofield', command: 'train', files: ['checkpoint.json', 'weights.bin'], complete: true, updatedAt: '2026-01-01T00:00:00.000Z' }, null, 1)}\n`);
    },
    argv: (s) => ['train', s.json('t.json', { version: 2, kind: 'train', system: { chain: { type: 'diblock', f: 0.5 }, chiN: 5 }, cell: { period: 3.7, nx: 16, ns: 20 } }), '--out', s.path('D'), '--overwrite', '--backend', 'wasm', '--quiet'],
    code: 2,
    message: /the reference is disordered at χN = 5/,
    check: (_r, s) => expect(existsSync(s.path('D/.mesofield-lock'))).toBe(false),
  },
  {
    group: 'output paths',
    name: 'a folder a killed run had only claimed (its marker lists no files, its lock is stale) is used without --overwrite',
    setup: (s) => {
      // As a short command killed by Ctrl-C between its claim and its first file leaves it
      // (the claim marks the folder at once; a pid that cannot exist holds the lock).
      s.mkdir('K');
      s.write('K/.mesofield-output.json', `${JSON.stringify({ tool: 'mesofield', command: 'synth', files: [], complete: false, updatedAt: '2026-01-01T00:00:00.000Z' }, null, 1)}\n`);
      s.write('K/.mesofield-lock', `${JSON.stringify({ pid: 2 ** 22 + 1, host: hostname(), command: 'synth', startedAt: '2026-01-01T00:00:00.000Z' })}\n`);
    },
    argv: (s) => [...SYNTH, '--out', s.path('K')],
    code: 0,
    mayChange: ['K'],
    check: (_r, s) => {
      const marker = JSON.parse(readFileSync(s.path('K/.mesofield-output.json'), 'utf8'));
      expect(marker).toMatchObject({ tool: 'mesofield', command: 'synth', complete: true });
      expect(marker.files.sort()).toEqual(['profile.csv', 'truth.json']);
      expect(existsSync(s.path('K/.mesofield-lock'))).toBe(false);
    },
  },
  {
    group: 'output paths',
    name: 'an empty folder is used (and marked as the output)',
    setup: (s) => void s.mkdir('E'),
    argv: (s) => [...SYNTH, '--out', s.path('E')],
    code: 0,
    check: (_r, s) => {
      const marker = JSON.parse(readFileSync(s.path('E/.mesofield-output.json'), 'utf8'));
      expect(marker).toMatchObject({ tool: 'mesofield', command: 'synth', complete: true });
      expect(marker.files.sort()).toEqual(['profile.csv', 'truth.json']);
    },
  },
  {
    group: 'output paths',
    name: 'a run refused after its folder was made leaves no folder behind',
    argv: (s) => [...SOLVE, '--start', s.path('missing.json'), '--out', s.path('new')],
    code: 2,
    message: /missing\.json: cannot read the file \(ENOENT\)/,
    check: (_r, s) => expect(existsSync(s.path('new'))).toBe(false),
  },
  // report: its folder is claimed like every command's --out (it was written over whatever was there).
  refused(
    'report --out a folder with other files',
    async (s) => {
      await previous(s, SOLVE, 'run');
      notes(s);
    },
    (s) => ['report', s.path('run'), '--format', 'pdf', '--out', s.path('D'), '--quiet'],
    /--out .*D: is not empty and was not written by mesofield \(it holds notes\.txt, sub\)/,
  ),
  refused(
    'report --out the run folder itself (a solve output, another command\'s)',
    (s) => previous(s, SOLVE, 'run'),
    (s) => ['report', s.path('run'), '--format', 'pdf', '--out', s.path('run'), '--quiet'],
    /--out .*run: holds the output of mesofield solve; allowed: a new or empty directory, or a previous report output/,
  ),
  refused(
    'report --out an existing file',
    async (s) => {
      await previous(s, SOLVE, 'run');
      s.write('F', 'precious\n');
    },
    (s) => ['report', s.path('run'), '--format', 'pdf', '--out', s.path('F'), '--quiet'],
    /--out .*F: is a file, not a directory/,
  ),
  refused(
    'report into RUN/report a second time without --overwrite',
    async (s) => {
      await previous(s, SOLVE, 'run');
      expect((await runCli(['report', s.path('run'), '--format', 'pdf', '--quiet'], { capture: true })).code).toBe(0);
    },
    (s) => ['report', s.path('run'), '--format', 'pdf', '--quiet'],
    /the report folder .*run\/report: holds a previous report output; give --overwrite/,
  ),
  {
    group: 'output paths',
    name: 'report --overwrite replaces its own files and keeps a file mesofield did not write',
    setup: async (s) => {
      await previous(s, SOLVE, 'run');
      expect((await runCli(['report', s.path('run'), '--out', s.path('R'), '--quiet'], { capture: true })).code).toBe(0);
      s.write('R/notes.txt', 'mine\n');
    },
    argv: (s) => ['report', s.path('run'), '--format', 'pdf', '--out', s.path('R'), '--overwrite', '--quiet'],
    code: 0,
    mayChange: ['R/report.pdf', 'R/figures', 'R/.mesofield-output.json'],
    check: (_r, s) => {
      expect(readFileSync(s.path('R/notes.txt'), 'utf8')).toBe('mine\n');
      expect(JSON.parse(readFileSync(s.path('R/.mesofield-output.json'), 'utf8'))).toMatchObject({ command: 'report', complete: true, files: ['report.pdf'] });
      // The PNGs of the replaced report (pdf,png) are its own and stale: removed.
      expect(existsSync(s.path('R/figures'))).toBe(false);
    },
  },
  {
    group: 'output paths',
    name: 'report --overwrite into RUN/report written by the run itself (listed in the run\'s marker, none of its own)',
    setup: async (s) => {
      await previous(s, SOLVE, 'run');
      // As `train --report` leaves it: the report files are the run's, in its marker.
      s.mkdir('run/report');
      s.write('run/report/report.pdf', 'an older report\n');
      const m = JSON.parse(readFileSync(s.path('run/.mesofield-output.json'), 'utf8'));
      s.json('run/.mesofield-output.json', { ...m, files: [...m.files, 'report/report.pdf'] });
    },
    argv: (s) => ['report', s.path('run'), '--format', 'pdf', '--overwrite', '--quiet'],
    code: 0,
    mayChange: ['run/report'],
    check: (_r, s) => {
      expect(readFileSync(s.path('run/report/report.pdf')).subarray(0, 5).toString()).toBe('%PDF-');
      expect(JSON.parse(readFileSync(s.path('run/report/.mesofield-output.json'), 'utf8'))).toMatchObject({ command: 'report', complete: true });
    },
  },
];

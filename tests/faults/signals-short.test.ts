/**
 * Signals during the short commands, whose work is one synchronous stretch before they write
 * (report, synth, bragg-pattern, fit-scattering, predict, and invert's report step): the stop
 * line, exit 130/143 and nothing written (src/cli/short-run-stop.ts). Real processes where the
 * work lasts long enough to be caught (synth on a fine grid, report at a high resolution, the
 * report after invert); bragg-pattern and fit-scattering take milliseconds, so there the stop is
 * asked in this process before the run by the path a signal takes (runtime/stop.ts requestStop)
 * and the run must end at its stop point. The report step after invert --film (and reflectivity,
 * the same command code) and after a surrogate's train is stopped in this process too, the stop
 * asked when the command announces the drawing. Exit codes: common practice, no source (128 + signal
 * number, as a shell reports a process a signal ended).
 */
import { cpSync, existsSync, mkdtempSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { runCli } from '../../src/cli/run-cli.js';
import { requestStop, resetStop } from '../../src/runtime/stop.js';
import { scatteringCsv, syntheticScattering } from '../helpers/debye-scattering.js';
import { stopAt } from './signal-process.js';
import { writeTally } from './tally.js';

const tmp = () => mkdtempSync(join(tmpdir(), 'mesofield-signal-short-'));
const counts = { tried: 0, 'clear error or stop': 0, 'correct answer': 0 };

// One small solve output serves report, bragg-pattern and invert (each copies what it changes);
// set-up, not a check: made in this process through the CLI entry function (no node start-up).
let solved: Promise<string> | undefined;
const solveOutput = () =>
  (solved ??= (async () => {
    const out = join(tmp(), 'sol');
    const r = await runCli(['solve', '--chiN', '15', '--period', '3.7', '--nx', '32', '--ns', '40', '--out', out, '--quiet'], { capture: true });
    expect(r.code, r.stderr).toBe(0);
    return out;
  })());

const stopLine = (command: string, sig: 'SIGINT' | 'SIGTERM') => new RegExp(`${command}: ${sig === 'SIGINT' ? 'Ctrl-C' : 'SIGTERM'}: stopping the ${command}; nothing will be written`);

describe('signals: short commands, real processes', () => {
  it('synth: SIGINT during the solve stops it before it writes, exit 130; --out is not created', async () => {
    counts.tried++;
    const out = join(tmp(), 'synth');
    // A fine contour and the stress-free period: the solve (about 0.7 s of CPU on 64 × 200, all of it
    // run before the stop point, as a signal cannot cut a synchronous stretch) lasts far longer than
    // the signal takes to arrive once its line is read.
    const { p, r } = await stopAt(['synth', '--f', '0.5', '--chiN', '15', '--nx', '64', '--ns', '200', '--out', out], /synth: solving the lamella/, 'SIGINT');
    expect(r.code, p.stderr()).toBe(130);
    expect(p.stderr()).toMatch(stopLine('synth', 'SIGINT'));
    expect(p.stderr()).toMatch(/synth stopped by a signal before it finished; nothing was written \(.*synth was left as it was\)/);
    expect(p.stderr()).not.toMatch(/synth: wrote/);
    expect(existsSync(out)).toBe(false);
    counts['clear error or stop']++;
  }, 120_000);

  it('synth to stdout: SIGTERM during the solve stops it with nothing printed, exit 143', async () => {
    counts.tried++;
    const { p, r } = await stopAt(['synth', '--f', '0.5', '--chiN', '15', '--nx', '64', '--ns', '200'], /synth: solving the lamella/, 'SIGTERM');
    expect(r.code, p.stderr()).toBe(143);
    expect(p.stderr()).toMatch(stopLine('synth', 'SIGTERM'));
    expect(p.stderr()).toMatch(/synth stopped by a signal before it finished; nothing was written/);
    counts['clear error or stop']++;
  }, 120_000);

  it('report: SIGTERM while drawing stops it before it writes, exit 143; a previous report in --out is untouched', async () => {
    counts.tried++;
    const run = join(tmp(), 'run');
    cpSync(await solveOutput(), run, { recursive: true });
    const out = join(tmp(), 'rep');
    // The previous report: set-up, made in this process through the CLI entry function.
    const first = await runCli(['report', run, '--out', out, '--format', 'pdf', '--quiet'], { capture: true });
    expect(first.code, first.stderr).toBe(0);
    const before = new Map(readdirSync(out, { recursive: true, withFileTypes: true }).filter((e) => e.isFile()).map((e) => [join(e.parentPath, e.name), readFileSync(join(e.parentPath, e.name))]));
    // PNGs at 300 dpi: the drawing (about 0.6 s of CPU, run whole before the stop point) lasts far longer than the signal takes to arrive.
    const { p, r } = await stopAt(['report', run, '--out', out, '--overwrite', '--dpi', '300'], /report: drawing the report/, 'SIGTERM');
    expect(r.code, p.stderr()).toBe(143);
    expect(p.stderr()).toMatch(stopLine('report', 'SIGTERM'));
    expect(p.stderr()).toMatch(/report stopped by a signal before it finished; nothing was written \(.*rep was left as it was\)/);
    const after = readdirSync(out, { recursive: true, withFileTypes: true }).filter((e) => e.isFile()).map((e) => join(e.parentPath, e.name));
    expect(after.sort()).toEqual([...before.keys()].sort());
    for (const [f, bytes] of before) expect(readFileSync(f).equals(bytes), f).toBe(true);
    counts['clear error or stop']++;
  }, 120_000);

  it('invert --report: SIGINT while drawing the report keeps the results, writes no report, exit 130; the output is marked incomplete', async () => {
    counts.tried++;
    const dir = tmp();
    // Set-up in this process; the invert is the process that is signalled.
    const synth = await runCli(['synth', '--f', '0.5', '--chiN', '15', '--points', '64', '--nx', '32', '--ns', '40', '--out', join(dir, 'synth'), '--quiet'], { capture: true });
    expect(synth.code, synth.stderr).toBe(0);
    const out = join(dir, 'inv');
    const { p, r } = await stopAt(['invert', join(dir, 'synth', 'profile.csv'), '--f', '0.5', '--nx', '16', '--ns', '20', '--out', out, '--report'], /invert: drawing the report/, 'SIGINT');
    expect(r.code, p.stderr()).toBe(130);
    expect(p.stderr()).toMatch(/invert: Ctrl-C: stopping before the report is written; the results in .*inv are complete/);
    expect(p.stderr()).toMatch(/invert stopped by a signal before its report was written; the results in .*inv are complete .*mesofield report .*inv/);
    expect(existsSync(join(out, 'result.json'))).toBe(true);
    expect(JSON.parse(readFileSync(join(out, 'result.json'), 'utf8')).kind).toBeDefined();
    expect(existsSync(join(out, 'report'))).toBe(false);
    const marker = JSON.parse(readFileSync(join(out, '.mesofield-output.json'), 'utf8')) as { command: string; complete: boolean };
    expect(marker).toMatchObject({ command: 'invert', complete: false });
    expect(existsSync(join(out, '.mesofield-lock'))).toBe(false);
    counts['clear error or stop']++;
  }, 180_000);

  it('train --report: SIGTERM while drawing the report keeps the checkpoint, writes no report, exit 143; the output is marked incomplete', async () => {
    counts.tried++;
    const dir = tmp();
    // A single-chain problem trained for a few steps: the training is over in seconds, the report is what is stopped.
    const config = join(dir, 'field.train.json');
    writeFileSync(config, JSON.stringify({ version: 2, kind: 'train', system: { chain: { type: 'homopolymer', species: 'A' }, externalField: { A: { type: 'cosine', amplitude: 2, mode: 1, offset: 0 } } }, cell: { period: 4, nx: 32, ns: 50 }, warmStart: { type: 'none' }, training: { adamSteps: 10 }, backend: 'wasm' }));
    const out = join(dir, 'ck');
    const { p, r } = await stopAt(['train', config, '--out', out, '--report'], /train: drawing the report/, 'SIGTERM');
    expect(r.code, p.stderr()).toBe(143);
    expect(p.stderr()).toMatch(/train: SIGTERM: stopping before the report is written; the checkpoint in .*ck is complete/);
    expect(p.stderr()).toMatch(/train stopped by a signal before its report was written; the checkpoint in .*ck is complete .*mesofield report .*ck/);
    expect(JSON.parse(readFileSync(join(out, 'checkpoint.json'), 'utf8')).config.training.adamSteps).toBe(10);
    expect(existsSync(join(out, 'report'))).toBe(false);
    const marker = JSON.parse(readFileSync(join(out, '.mesofield-output.json'), 'utf8')) as { command: string; complete: boolean };
    expect(marker).toMatchObject({ command: 'train', complete: false });
    expect(existsSync(join(out, '.mesofield-lock'))).toBe(false);
    counts['clear error or stop']++;
  }, 180_000);
});

describe('signals: short commands stopped at their stop point (the stop asked as a signal asks it)', () => {
  async function stoppedRun(args: string[]) {
    requestStop('SIGINT');
    try {
      return await runCli(args, { capture: true });
    } finally {
      resetStop();
    }
  }

  it('bragg-pattern: nothing written, exit 130, the stop message', async () => {
    counts.tried++;
    const out = join(tmp(), 'bragg');
    const r = await stoppedRun(['bragg-pattern', join(await solveOutput(), 'solution.json'), '--out', out]);
    expect(r.code, r.stderr).toBe(130);
    expect(r.stderr).toMatch(/bragg-pattern stopped by a signal before it finished; nothing was written \(.*bragg was left as it was\)/);
    expect(r.stdout).toBe('');
    expect(existsSync(out)).toBe(false);
    counts['clear error or stop']++;
  }, 60_000);

  it('fit-scattering: nothing written, a previous output untouched, exit 130', async () => {
    counts.tried++;
    const dir = tmp();
    // Scenario of our own: a symmetric diblock at χN = 8, Rg = 6 nm, 2 % noise on I.
    const data = join(dir, 'I.csv');
    writeFileSync(data, scatteringCsv(syntheticScattering({ f: 0.5, chiN: 8, rg: 6, K: 50, bg: 0.3, noise: 0.02, seed: 3 })));
    const out = join(dir, 'fit');
    const first = await runCli(['fit-scattering', data, '--f', '0.5', '--out', out, '--quiet'], { capture: true });
    expect(first.code, first.stderr).toBe(0);
    const before = readFileSync(join(out, 'result.json'));
    const r = await stoppedRun(['fit-scattering', data, '--f', '0.5', '--out', out, '--overwrite']);
    expect(r.code, r.stderr).toBe(130);
    expect(r.stderr).toMatch(/fit-scattering stopped by a signal before it finished; nothing was written \(.*fit was left as it was\)/);
    expect(readFileSync(join(out, 'result.json')).equals(before)).toBe(true);
    expect(existsSync(join(out, '.mesofield-lock'))).toBe(false);
    counts['clear error or stop']++;
  }, 60_000);
});

describe('signals: the report after a run, stopped at its stop point (the stop asked when drawing begins)', () => {
  /**
   * Run a command line in this process and ask the stop, by the path a signal takes, when the
   * command says it is drawing the report: the results are on disk by then, so what is checked
   * is the report step's stop in the command's own wiring (invert --film and reflectivity share
   * cli/commands/film-fit-command.ts; the surrogate's train is cli/commands/train-surrogate.ts).
   */
  async function stoppedWhileDrawing(args: string[]) {
    const out = process.stdout.write;
    const err = process.stderr.write;
    let stdout = '';
    let stderr = '';
    process.stdout.write = ((s: string | Uint8Array) => ((stdout += String(s)), true)) as typeof process.stdout.write;
    process.stderr.write = ((s: string | Uint8Array) => {
      stderr += String(s);
      if (/drawing the report/.test(String(s))) requestStop('SIGINT');
      return true;
    }) as typeof process.stderr.write;
    try {
      const r = await runCli(args);
      return { code: r.code, stdout, stderr };
    } finally {
      process.stdout.write = out;
      process.stderr.write = err;
      resetStop();
    }
  }

  const expectKeptAndMarked = (out: string, command: string, marked: string, kept: string, files: string[]) => {
    for (const f of files) expect(existsSync(join(out, f)), f).toBe(true);
    expect(existsSync(join(out, 'report'))).toBe(false);
    const marker = JSON.parse(readFileSync(join(out, '.mesofield-output.json'), 'utf8')) as { command: string; complete: boolean };
    expect(marker).toMatchObject({ command: marked, complete: false });
    expect(existsSync(join(out, '.mesofield-lock'))).toBe(false);
    return new RegExp(`${command} stopped by a signal before its report was written; ${kept} in .* complete .*mesofield report`);
  };

  it('invert --film --report: the results of the fit stay, no report, exit 130, the output marked incomplete', async () => {
    counts.tried++;
    const dir = tmp();
    // A 6 Rg film's depth profile on a coarse model (the fit's accuracy is checked in tests/inverse/film-fit.test.ts).
    const synth = await runCli(['synth', '--film', '6', '--f', '0.5', '--chiN', '15', '--affinity', '1,-0.5', '--measure', 'phi', '--points', '24', '--noise', '0.01', '--nx', '16', '--ns', '20', '--quiet', '--out', join(dir, 's')], { capture: true });
    expect(synth.code, synth.stderr).toBe(0);
    const out = join(dir, 'inv');
    const r = await stoppedWhileDrawing(['invert', join(dir, 's', 'profile.csv'), '--f', '0.5', '--film', '6', '--nx', '16', '--ns', '20', '--intervals', 'none', '--out', out, '--report']);
    expect(r.code, r.stderr).toBe(130);
    expect(r.stderr).toMatch(expectKeptAndMarked(out, 'invert', 'invert', 'the results', ['result.json', 'fit.csv', 'solution.json']));
    counts['clear error or stop']++;
  }, 60_000);

  it('train --report on a surrogate config: the checkpoint stays, no report, exit 130, the output marked incomplete', async () => {
    counts.tried++;
    const dir = tmp();
    const config = join(dir, 'tiny.surrogate.json');
    // Three anchors, a short fit, no physics round: seconds; the surrogate's accuracy is tests/surrogate's.
    writeFileSync(config, JSON.stringify({ version: 2, kind: 'surrogate', backend: 'wasm', parameters: { chiN: { min: 13, max: 17, anchors: 3 } }, cell: { nx: 16, ns: 40 }, warmStart: { extraSolves: 0, lbfgsIterations: 20 }, training: { rounds: 0 }, evaluation: { random: 0 } }));
    const out = join(dir, 'ck');
    const r = await stoppedWhileDrawing(['train', config, '--out', out, '--report']);
    expect(r.code, r.stderr).toBe(130);
    expect(r.stderr).toMatch(expectKeptAndMarked(out, 'train', 'train (surrogate)', 'the checkpoint', ['checkpoint.json', 'weights.bin', 'metrics.json']));
    counts['clear error or stop']++;
  }, 60_000);
});

afterAll(() => {
  // The same group as signals.test.ts: faults:summary adds the files' counts up.
  writeTally('signals-short', { 'signals and resume': { tried: counts.tried, 'clear error': counts['clear error or stop'], 'correct answer': counts['correct answer'], wrong: counts.tried - counts['clear error or stop'] - counts['correct answer'] } });
});

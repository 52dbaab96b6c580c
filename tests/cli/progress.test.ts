/**
 * Progress on stderr for the whole run: each line has the count, what it reached, the rate and
 * the time left; results stay alone on stdout. The whole-run arithmetic is checked with a
 * controlled clock (common practice, no source: time left = units left / measured rate, each
 * later phase at its own measured rate or else the current one).
 */
import { afterEach, describe, expect, it, vi } from 'vitest';
import { Progress, RunProgress } from '../../src/cli/progress.js';
import { runCli as runInProcess } from '../../src/cli/run-cli.js';
import { runCli } from '../helpers/run-cli.js';

describe('RunProgress: time left for the whole run', () => {
  afterEach(() => vi.restoreAllMocks());

  it('adds a later phase at its own rate once measured, at the current rate when it counts the same unit (marked ~), and names it when it does not', () => {
    let now = 0;
    vi.spyOn(performance, 'now').mockImplementation(() => now);
    const lines: string[] = [];
    vi.spyOn(process.stderr, 'write').mockImplementation((s: string | Uint8Array) => (lines.push(String(s)), true));
    const run = new RunProgress(new Progress('t', false, 0), [
      { name: 'warm start', units: 100, unit: 'steps' },
      { name: 'Adam', units: 100, unit: 'steps' },
      { name: 'L-BFGS', units: 50, unit: 'iterations' },
    ]);
    now = 1000; // 100 warm-start steps in 1 s
    run.at('warm start', 100, 'loss 2');
    expect(lines.shift()).toBe('t: warm start 100/100 steps | loss 2 | 100 steps/s | ~1.0 s left, then 50 iterations (L-BFGS) not yet timed\n');
    run.begin('Adam');
    now = 3000; // the first phase's clock started with the run: 10 steps in 2 s
    run.at('Adam', 10, 'loss 1');
    expect(lines[0]).toBe('t: Adam 10/100 steps | loss 1 | 5.0 steps/s | 18.0 s left, then 50 iterations (L-BFGS) not yet timed\n');
    now = 12000; // 50 steps in 11 s: 0.22 s per step
    run.at('Adam', 50, 'loss 0.5');
    expect(lines[1]).toBe('t: Adam 50/100 steps | loss 0.5 | 4.5 steps/s | 11.0 s left, then 50 iterations (L-BFGS) not yet timed\n');
    run.begin('L-BFGS');
    now = 22000; // 10 iterations in 10 s
    run.at('L-BFGS', 10, 'loss 0.1');
    expect(lines[2]).toBe('t: L-BFGS 10/50 iterations | loss 0.1 | 1.0 iterations/s | 40.0 s left\n');
  });
});

describe('long commands from the command line', () => {
  it('solve (period search) and invert (classical fit, Rg refits) show the rate and time left on stderr; stdout holds only the result', async () => {
    const solve = runCli(['solve', '--f', '0.4', '--chiN', '20', '--nx', '32', '--ns', '60', '--json']);
    expect(solve.code, solve.stderr).toBe(0);
    expect(solve.stderr).toMatch(/^solve: period search \d+\/~\d+ evaluations \| L = [\d.]+ Rg, F = [\d.]+ kT \(lamellar\), field residual [\d.e+-]+ kT \| [\d.]+ evaluations\/s \| ~[\d.]+ s left/m);
    expect(JSON.parse(solve.stdout).phase).toBe('lamellar');
    expect(solve.stdout).not.toMatch(/left|evaluations\/s/);

    const dir = `${process.env.TMPDIR ?? '/tmp'}/mesofield-progress-${process.pid}`;
    // The profile is set-up: made in this process through the CLI entry function; the two runs
    // whose progress is checked are processes of their own (stderr to a pipe, stdout apart).
    expect((await runInProcess(['synth', '--f', '0.5', '--chiN', '15', '--nx', '32', '--ns', '60', '--points', '40', '--noise', '0.02', '--rg-nm', '3', '--out', dir, '--quiet'], { capture: true })).code).toBe(0);
    const inv = runCli(['invert', `${dir}/profile.csv`, '--f', '0.5', '--nx', '32', '--ns', '60', '--rg-nm', '3', '--chiN-range', '12,20', '--json']);
    expect(inv.code, inv.stderr).toBe(0);
    expect(inv.stderr).toMatch(/^invert: classical fit \d+\/~\d+ evaluations \| .*χN = [\d.]+, misfit [\d.]+.* \| [\d.]+ evaluations\/s \| ~[\d.]+ s left, then 2 refits \(assumed inputs\) not yet timed$/m);
    expect(inv.stderr).toMatch(/^invert: assumed inputs 1\/2 refits \| refit with rgNm = [\d.]+ \| [\d.]+ refits\/s \| [\d.]+ s left/m);
    expect(JSON.parse(inv.stdout).kind).toBe('inversion');
    expect(inv.stdout).not.toMatch(/left|evaluations\/s/);
  });
});

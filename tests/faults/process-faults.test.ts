/**
 * Faults of the process around a run, on real processes where they need one:
 * - a reader that closes stdout early (`| head -1`): the run ends quietly with its own exit code,
 *   no "internal error", no stack trace, its files complete (common practice for a closed pipe, no source);
 * - an internal error raised inside a worker thread: the user sees one line, and the worker's
 *   stack is kept (the crash file the line names, and --debug).
 */
import { spawn } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { runCli } from '../../src/cli/run-cli.js';
import { reportError } from '../../src/cli/run-command.js';
import { setInvocation } from '../../src/cli/cli-context.js';
import { runInWorkers } from '../../src/threads/worker-pool.js';
import { CLI } from '../helpers/run-cli.js';
import { writeTally } from './tally.js';

const counts = { tried: 0, 'clear error': 0, 'correct answer': 0, wrong: 0 };
const STACK = /\n\s+at .+:\d+:\d+/;

/** Run the CLI with its stdout closed by the reader before the command writes anything. */
function runWithClosedStdout(args: string[]): Promise<{ code: number | null; stderr: string }> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, [CLI, ...args], { stdio: ['ignore', 'pipe', 'pipe'] });
    // The reader goes away at once, as `head -c 0` would: every write to stdout meets EPIPE.
    child.stdout.destroy();
    let err = '';
    child.stderr.on('data', (d) => (err += String(d)));
    child.on('close', (code) => resolve({ code, stderr: err }));
  });
}

describe('a closed stdout (EPIPE)', () => {
  const dir = mkdtempSync(join(tmpdir(), 'mesofield-pipe-'));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('solve --json | (closed): exit 0, quiet, its files written whole', async () => {
    counts.tried++;
    const out = join(dir, 'sol');
    const r = await runWithClosedStdout(['solve', '--chiN', '15', '--period', '3.7', '--nx', '16', '--ns', '20', '--json', '--quiet', '--out', out]);
    expect(r.stderr).not.toMatch(/internal error|EPIPE/);
    expect(r.stderr).not.toMatch(STACK);
    expect(r.code).toBe(0);
    expect(JSON.parse(readFileSync(join(out, 'solution.json'), 'utf8')).summary.converged).toBe(true);
    counts['clear error']++;
  });

  it('invert --json data.csv | (closed): exit 0, quiet', async () => {
    counts.tried++;
    const synth = join(dir, 'synth');
    // The profile is set-up, made in this process; the invert is the run whose reader goes away.
    const s = await runCli(['synth', '--f', '0.5', '--chiN', '15', '--period', '3.7', '--nx', '16', '--ns', '20', '--points', '24', '--out', synth, '--quiet'], { capture: true });
    expect(s.code, s.stderr).toBe(0);
    const r = await runWithClosedStdout(['invert', join(synth, 'profile.csv'), '--f', '0.5', '--nx', '16', '--ns', '20', '--json', '--quiet']);
    expect(r.stderr).not.toMatch(/internal error|EPIPE/);
    expect(r.stderr).not.toMatch(STACK);
    expect(r.code).toBe(0);
    counts['clear error']++;
  }, 60_000);
});

describe('an internal error inside a worker thread', () => {
  it('reaches the user as one line; the worker stack is kept in the crash file it names', async () => {
    counts.tried++;
    const entry = new URL('./fixtures/failing-task-worker.mjs', import.meta.url);
    const e = await runInWorkers<number, never>([7], { entry, workerData: null, workers: 1 }).then(
      () => null,
      (x: unknown) => x as Error,
    );
    expect(e).toBeInstanceOf(Error);
    // The worker's own frames survive the thread boundary.
    expect(e!.stack).toMatch(/raised in a worker thread:[\s\S]*innerStepThatFails[\s\S]*failing-task-worker\.mjs/);

    setInvocation(['solve', '--chiN', '15'], false);
    let stderr = '';
    const write = process.stderr.write;
    process.stderr.write = ((s: string) => ((stderr += s), true)) as typeof process.stderr.write;
    let code: number;
    try {
      code = reportError(e);
    } finally {
      process.stderr.write = write;
    }
    expect(code).toBe(4);
    expect(stderr).toMatch(/^mesofield: internal error \(a bug, please report it\): Error: index 7 out of range in a test worker\n/);
    expect(stderr).toMatch(/to reproduce: mesofield solve --chiN 15 --debug/);
    expect(stderr).not.toMatch(STACK);
    const crash = /the trace is saved in (\S+) \(attach it to the report\)/.exec(stderr)?.[1];
    expect(crash && existsSync(crash)).toBe(true);
    const text = readFileSync(crash!, 'utf8');
    expect(text).toMatch(/^command: mesofield solve --chiN 15\n/);
    expect(text).toMatch(/raised in a worker thread:[\s\S]*at innerStepThatFails .*failing-task-worker\.mjs:\d+:\d+/);
    rmSync(crash!);
    counts['clear error']++;
  });
});

afterAll(() => writeTally('process-faults', { 'pipes and internal errors': { ...counts, wrong: counts.tried - counts['clear error'] - counts['correct answer'] } }));

/**
 * Signals mid-run, on real processes (a signal handler can only be tested in a process of its
 * own), and resume fidelity in process through the same stop flag a signal sets.
 *
 * - train: SIGINT → exit 130, SIGTERM → exit 143, each after saving a checkpoint it names;
 *   SIGKILL → no handler runs, the last periodic checkpoint stays and --resume finishes it.
 * - sweep: SIGINT → exit 130 with the solved points saved; the same command again resumes.
 * - solve: SIGINT/SIGTERM mid-search → 130/143 at once, nothing written, a previous output untouched.
 * - demo: SIGINT mid-training → 130, the finished parts kept and marked incomplete.
 * - resume: a run stopped at step k by requestStop (the signal's own code path) and resumed
 *   reproduces the uninterrupted run's loss curve and final metrics.
 */
import { spawn } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { trainConfigSchema } from '../../src/io/schemas/train-config.js';
import { requestStop, resetStop, stopRequested } from '../../src/runtime/stop.js';
import { trainRun, TrainingStopped } from '../../src/training/train-run.js';
import { CLI } from '../helpers/run-cli.js';
import { writeTally } from './tally.js';

const tmp = () => mkdtempSync(join(tmpdir(), 'mesofield-signal-'));
const counts = { tried: 0, 'clear error or stop': 0, 'correct answer': 0 };

/** A small train config: a fixed cell on a coarse grid, small networks, no L-BFGS: seconds per run. */
const TRAIN = {
  version: 2,
  kind: 'train',
  system: { chain: { type: 'diblock', f: 0.5 }, chiN: 15 },
  cell: { period: 3.7, nx: 32, ns: 40 },
  backend: 'wasm',
  networks: { field: { hidden: [16, 16] }, propagator: { hidden: [16, 16] } },
  collocation: { random: 64, resampleEvery: 40 },
  warmStart: { type: 'reference', adamSteps: 20 },
  training: { adamSteps: 4000, checkpointEvery: 10, logEvery: 10, lbfgsIterations: 0, evaluateEvery: 0 },
};

interface Proc {
  code: Promise<{ code: number | null; signal: NodeJS.Signals | null }>;
  stderr: () => string;
  kill: (s: NodeJS.Signals) => void;
  waitFor: (re: RegExp, ms: number) => Promise<void>;
}

function start(args: string[]): Proc {
  const child = spawn(process.execPath, [CLI, ...args], { stdio: ['ignore', 'pipe', 'pipe'] });
  let err = '';
  child.stderr.on('data', (d) => (err += String(d)));
  child.stdout.resume();
  const code = new Promise<{ code: number | null; signal: NodeJS.Signals | null }>((resolve) => child.on('close', (c, s) => resolve({ code: c, signal: s })));
  return {
    code,
    stderr: () => err,
    kill: (s) => child.kill(s),
    waitFor: async (re, ms) => {
      const t0 = Date.now();
      while (!re.test(err)) {
        if (Date.now() - t0 > ms) throw new Error(`timed out waiting for ${re}; stderr so far:\n${err}`);
        if (child.exitCode !== null) throw new Error(`exited ${child.exitCode} before ${re}; stderr:\n${err}`);
        await new Promise((r) => setTimeout(r, 100));
      }
    },
  };
}

const checkpointStep = (dir: string) => (JSON.parse(readFileSync(join(dir, 'checkpoint.json'), 'utf8')) as { step: number }).step;

describe('signals', () => {
  for (const [sig, exit] of [
    ['SIGINT', 130],
    ['SIGTERM', 143],
  ] as const) {
    it(`train: ${sig} mid-training saves a checkpoint, says where, and exits ${exit}`, async () => {
      counts.tried++;
      const dir = tmp();
      const cfg = join(dir, 't.json');
      writeFileSync(cfg, JSON.stringify(TRAIN));
      const out = join(dir, 'run');
      const p = start(['train', cfg, '--out', out]);
      await p.waitFor(/Adam \d+\/4000 steps/, 120_000);
      p.kill(sig);
      const r = await p.code;
      expect(r.code, p.stderr()).toBe(exit);
      expect(p.stderr()).toMatch(new RegExp(`${sig === 'SIGINT' ? 'Ctrl-C' : 'SIGTERM'}: stopping after this step and saving a checkpoint`));
      expect(p.stderr()).toMatch(/interrupted at step (\d+); checkpoint saved at step \1 \(checkpoint: .*run, step \1\)/);
      const step = Number(/interrupted at step (\d+)/.exec(p.stderr())![1]);
      expect(checkpointStep(out)).toBe(step);
      expect(existsSync(join(out, '.mesofield-lock'))).toBe(false);
      counts['clear error or stop']++;
    });
  }

  it('train: SIGKILL leaves the last periodic checkpoint; --resume continues from it to the end', async () => {
    counts.tried++;
    const dir = tmp();
    const cfg = join(dir, 't.json');
    writeFileSync(cfg, JSON.stringify({ ...TRAIN, training: { ...TRAIN.training, adamSteps: 60 } }));
    const out = join(dir, 'run');
    const p = start(['train', cfg, '--out', out]);
    await p.waitFor(/Adam (1\d|[2-9]\d)\/60 steps/, 120_000);
    p.kill('SIGKILL');
    expect((await p.code).signal).toBe('SIGKILL');
    const saved = checkpointStep(out);
    expect(saved % 10).toBe(0);
    // The killed run's lock is stale (its process is gone): the resume takes it over.
    expect(existsSync(join(out, '.mesofield-lock'))).toBe(true);
    const q = start(['train', cfg, '--resume', out, '--json']);
    const r = await q.code;
    expect(r.code, q.stderr()).toBe(0);
    expect(q.stderr()).toMatch(new RegExp(`resumed from .*run at step ${saved}`));
    expect(checkpointStep(out)).toBe(60);
    counts['correct answer']++;
  });

  it('sweep: SIGINT between points saves the solved points and exits 130; the same command resumes', async () => {
    counts.tried++;
    const dir = tmp();
    const cfg = join(dir, 's.json');
    writeFileSync(cfg, JSON.stringify({ version: 2, kind: 'sweep', system: { chain: { type: 'diblock' } }, parameters: { chiN: { from: 12, to: 20, count: 40 }, f: [0.5], segmentRatio: [1] }, cell: { period: 'equilibrium', nx: 32, ns: 40 } }));
    const out = join(dir, 'sw');
    const p = start(['sweep', cfg, '--out', out, '--workers', '1']);
    await p.waitFor(/point [2-9]\d*\/40/, 120_000);
    p.kill('SIGINT');
    const r = await p.code;
    expect(r.code, p.stderr()).toBe(130);
    expect(p.stderr()).toMatch(/stopped after (\d+) of 40 points; they are saved in .*shard-1-of-1\.json; run the same command again/);
    const done = Number(/stopped after (\d+) of 40/.exec(p.stderr())![1]);
    expect(done).toBeGreaterThan(0);
    expect(JSON.parse(readFileSync(join(out, 'shard-1-of-1.json'), 'utf8')).points.length).toBe(done);
    const q = start(['sweep', cfg, '--out', out, '--workers', '1', '--json']);
    const r2 = await q.code;
    expect(r2.code, q.stderr()).toBe(0);
    expect(q.stderr()).toMatch(new RegExp(`resuming .* ${done} of 40 points already saved`));
    counts['clear error or stop']++;
  });
});

describe('signals: solve and demo', () => {
  for (const [sig, exit] of [
    ['SIGINT', 130],
    ['SIGTERM', 143],
  ] as const) {
    it(`solve: ${sig} during the period search ends at once with exit ${exit}; the previous output in --out is untouched`, async () => {
      counts.tried++;
      const dir = tmp();
      const out = join(dir, 'sol');
      const first = start(['solve', '--chiN', '15', '--period', '3.7', '--nx', '32', '--ns', '40', '--out', out, '--quiet']);
      expect((await first.code).code, first.stderr()).toBe(0);
      const before = ['solution.json', 'profile.csv', '.mesofield-output.json'].map((n) => readFileSync(join(out, n)));
      const p = start(['solve', '--chiN', '40', '--period', 'equilibrium', '--nx', '64', '--ns', '400', '--out', out, '--overwrite']);
      await p.waitFor(/period search 1\//, 120_000);
      p.kill(sig);
      const r = await p.code;
      expect(r.code, p.stderr()).toBe(exit);
      expect(p.stderr()).toMatch(new RegExp(`solve: ${sig === 'SIGINT' ? 'Ctrl-C' : 'SIGTERM'}: stopping the solve; nothing will be written`));
      expect(p.stderr()).toMatch(/solve stopped by a signal before it finished; nothing was written \(.*sol was left as it was\)/);
      expect(p.stderr()).not.toMatch(/lamellar, \d+ period evaluations/);
      ['solution.json', 'profile.csv', '.mesofield-output.json'].forEach((n, i) => expect(readFileSync(join(out, n)).equals(before[i]), n).toBe(true));
      expect(existsSync(join(out, '.mesofield-lock'))).toBe(false);
      counts['clear error or stop']++;
    }, 180_000);
  }

  it('demo: SIGINT during the training stops it, exit 130; the finished parts stay, marked incomplete', async () => {
    counts.tried++;
    const dir = tmp();
    const out = join(dir, 'demo');
    const p = start(['demo', '--out', out, '--backend', 'wasm']);
    await p.waitFor(/2\/3 training/, 180_000);
    p.kill('SIGINT');
    const r = await p.code;
    expect(r.code, p.stderr()).toBe(130);
    expect(p.stderr()).toMatch(/demo: Ctrl-C: stopping after the current stage/);
    expect(p.stderr()).toMatch(/demo stopped by a signal after the reference and part of the training/);
    expect(existsSync(join(out, 'reference', 'solution.json'))).toBe(true);
    expect(existsSync(join(out, 'inversion'))).toBe(false);
    const marker = JSON.parse(readFileSync(join(out, '.mesofield-output.json'), 'utf8')) as { command: string; complete: boolean; files: string[] };
    expect(marker.command).toBe('demo');
    expect(marker.complete).toBe(false);
    expect(marker.files).toContain('reference/solution.json');
    expect(existsSync(join(out, '.mesofield-lock'))).toBe(false);
    counts['clear error or stop']++;
  }, 240_000);
});

describe('signals: loops that ran to their end (classical invert, surrogate fit, the demo\'s solve)', () => {
  it('invert (classical): SIGINT during the χN search ends it at once, exit 130; nothing written, the previous output untouched', async () => {
    counts.tried++;
    const dir = tmp();
    const synth = start(['synth', '--f', '0.5', '--chiN', '15', '--points', '64', '--nx', '32', '--ns', '40', '--out', join(dir, 'synth')]);
    expect((await synth.code).code, synth.stderr()).toBe(0);
    const csv = join(dir, 'synth', 'profile.csv');
    const out = join(dir, 'inv');
    const first = start(['invert', csv, '--f', '0.5', '--nx', '16', '--ns', '20', '--out', out, '--quiet']);
    expect((await first.code).code, first.stderr()).toBe(0);
    const before = ['result.json', 'fit.csv', 'solution.json', '.mesofield-output.json'].map((n) => readFileSync(join(out, n)));
    // A fine grid: each χN evaluation takes a while, and the whole fit far longer than the wait for a stop.
    const p = start(['invert', csv, '--f', '0.5', '--nx', '64', '--ns', '400', '--out', out, '--overwrite']);
    await p.waitFor(/classical fit \d+\//, 120_000);
    p.kill('SIGINT');
    const r = await p.code;
    expect(r.code, p.stderr()).toBe(130);
    expect(p.stderr()).toMatch(/invert: Ctrl-C: stopping the fit; nothing will be written/);
    expect(p.stderr()).toMatch(/invert stopped by a signal during the classical fit; nothing was written \(.*inv was left as it was\)/);
    // Stopped mid-search: the fit's closing line never came.
    expect(p.stderr()).not.toMatch(/invert: χN = [\d.]+ in/);
    ['result.json', 'fit.csv', 'solution.json', '.mesofield-output.json'].forEach((n, i) => expect(readFileSync(join(out, n)).equals(before[i]), n).toBe(true));
    expect(existsSync(join(out, '.mesofield-lock'))).toBe(false);
    counts['clear error or stop']++;
  }, 180_000);

  it('train (surrogate): SIGTERM while fitting the field network stops within a step, exit 143, nothing saved', async () => {
    counts.tried++;
    const dir = tmp();
    const cfg = join(dir, 'su.json');
    // A fit far longer than the test: only a stop inside it ends the run.
    writeFileSync(cfg, JSON.stringify({ version: 2, kind: 'surrogate', backend: 'wasm', parameters: { chiN: { min: 13, max: 17, anchors: 3 } }, cell: { nx: 16, ns: 20 }, warmStart: { extraSolves: 0, adamSteps: 100000, lbfgsIterations: 0 }, training: { rounds: 1, pointsPerRound: 2 }, evaluation: { random: 0 } }));
    const out = join(dir, 'ck');
    const p = start(['train', cfg, '--out', out]);
    await p.waitFor(/fitting the field network/, 120_000);
    await new Promise((res) => setTimeout(res, 500));
    p.kill('SIGTERM');
    const r = await p.code;
    expect(r.code, p.stderr()).toBe(143);
    expect(p.stderr()).toMatch(/surrogate training stopped by a signal while fitting the field network; nothing was saved/);
    expect(existsSync(join(out, '.mesofield-lock'))).toBe(false);
    counts['clear error or stop']++;
  }, 180_000);

  it('demo: SIGINT during the reference solve ends it at once, exit 130', async () => {
    counts.tried++;
    const dir = tmp();
    const out = join(dir, 'demo');
    const p = start(['demo', '--out', out, '--backend', 'wasm']);
    await p.waitFor(/1\/3 reference solve/, 120_000);
    p.kill('SIGINT');
    const r = await p.code;
    expect(r.code, p.stderr()).toBe(130);
    expect(p.stderr()).toMatch(/demo stopped by a signal after nothing \(it was in the reference solve\)/);
    expect(existsSync(join(out, 'reference', 'solution.json'))).toBe(false);
    expect(existsSync(join(out, '.mesofield-lock'))).toBe(false);
    counts['clear error or stop']++;
  }, 180_000);
});

describe('resume fidelity', () => {
  it('a run stopped at step 25 by the stop flag and resumed reproduces the uninterrupted run', async () => {
    counts.tried++;
    const base = trainConfigSchema.parse({ ...TRAIN, cell: { period: 'equilibrium', nx: 32, ns: 40 }, training: { ...TRAIN.training, adamSteps: 50, lbfgsIterations: 20, lbfgsCycles: 1 } });
    const whole = await trainRun({ config: base, backend: 'wasm' });
    const dir = join(tmp(), 'run');
    resetStop();
    const stopped = await trainRun({ config: base, outDir: dir, backend: 'wasm', shouldStop: stopRequested, onProgress: (p) => p.step >= 25 && !stopRequested() && requestStop('SIGINT') }).catch((e) => e);
    resetStop();
    expect(stopped).toBeInstanceOf(TrainingStopped);
    expect(checkpointStep(dir)).toBe(25);
    const resumed = await trainRun({ config: base, resumeDir: dir, outDir: dir, backend: 'wasm' });
    // The loss curve after the stop, to float32 rounding (the networks run in float32).
    const tail = (h: typeof whole.history) => h.filter((e) => e.stage === 'adam' && e.step > 25).map((e) => e.total);
    const a = tail(whole.history);
    const b = tail(resumed.history);
    expect(b.length).toBe(a.length);
    for (let i = 0; i < a.length; i++) expect(Math.abs(b[i] / a[i] - 1)).toBeLessThan(1e-6);
    // The reference it is judged by is the same lamella (same phase), so the final metrics agree.
    expect(resumed.reference.phi.A[0]).toBeCloseTo(whole.reference.phi.A[0], 9);
    const rel = (x: number, y: number) => Math.abs(x / y - 1);
    expect(rel(resumed.metrics.errors.phiA.relativeL2, whole.metrics.errors.phiA.relativeL2)).toBeLessThan(1e-6);
    expect(rel(resumed.metrics.errors.freeEnergyError, whole.metrics.errors.freeEnergyError)).toBeLessThan(1e-6);
    counts['correct answer']++;
    // Changed settings on resume are refused with the differences listed, never silently ignored.
    counts.tried++;
    const changed = { ...base, training: { ...base.training, learningRate: base.training.learningRate * 2 } };
    await expect(trainRun({ config: changed, resumeDir: dir, outDir: dir, backend: 'wasm' })).rejects.toThrow(/the config differs from the one the checkpoint was trained with[\s\S]*training\.learningRate: checkpoint 0\.002, config 0\.004/);
    counts['clear error or stop']++;
  });
});

describe('resume fidelity after a stop in the L-BFGS polish', () => {
  it('a run stopped at L-BFGS iteration 6 by the stop flag and resumed ends where the uninterrupted run ends', async () => {
    counts.tried++;
    const base = trainConfigSchema.parse({ ...TRAIN, cell: { period: 'equilibrium', nx: 32, ns: 40 }, training: { ...TRAIN.training, adamSteps: 30, lbfgsIterations: 16, lbfgsCycles: 1 } });
    const whole = await trainRun({ config: base, backend: 'wasm' });
    const dir = join(tmp(), 'run');
    resetStop();
    const stopped = await trainRun({ config: base, outDir: dir, backend: 'wasm', shouldStop: stopRequested, onLbfgs: (it) => it >= 6 && !stopRequested() && requestStop('SIGTERM') }).catch((e) => e);
    resetStop();
    expect(stopped).toBeInstanceOf(TrainingStopped);
    expect(String(stopped.message)).toMatch(/interrupted in the L-BFGS polish after \d+ iterations .*a resume repeats the polish from there/);
    expect(checkpointStep(dir)).toBe(30);
    const resumed = await trainRun({ config: base, resumeDir: dir, outDir: dir, backend: 'wasm' });
    // The polish's loss curve, iteration by iteration, to float32 rounding.
    const polish = (h: typeof whole.history) => h.filter((e) => e.stage === 'lbfgs').map((e) => e.total);
    const a = polish(whole.history);
    const b = polish(resumed.history);
    expect(b.length).toBe(a.length);
    for (let i = 0; i < a.length; i++) expect(Math.abs(b[i] / a[i] - 1)).toBeLessThan(1e-6);
    const rel = (x: number, y: number) => Math.abs(x / y - 1);
    expect(rel(resumed.metrics.errors.phiA.relativeL2, whole.metrics.errors.phiA.relativeL2)).toBeLessThan(1e-6);
    expect(rel(resumed.metrics.errors.freeEnergyError, whole.metrics.errors.freeEnergyError)).toBeLessThan(1e-6);
    counts['correct answer']++;
  });
});

afterAll(() => {
  // Every case here ends in a stop or a refusal it expects (clear) or in a checked answer (correct); a failure fails the test.
  writeTally('signals', { 'signals and resume': { tried: counts.tried, 'clear error': counts['clear error or stop'], 'correct answer': counts['correct answer'], wrong: counts.tried - counts['clear error or stop'] - counts['correct answer'] } });
  process.stdout.write(`\nsignals and resume: tried ${counts.tried}, clear error or stop ${counts['clear error or stop']}, correct answer ${counts['correct answer']}\n`);
});

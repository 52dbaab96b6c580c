/**
 * Signals mid-run, on real processes (a signal handler can only be tested in a process of its
 * own), and resume fidelity in process through the same stop flag a signal sets.
 *
 * - train: SIGINT → exit 130, SIGTERM → exit 143, each after saving a checkpoint it names;
 *   SIGKILL → no handler runs, the last periodic checkpoint stays and --resume finishes it.
 * - sweep: SIGINT → exit 130 with the solved points saved; the same command again resumes.
 * - resume: a run stopped at step k (in the field-update phase) or in the L-BFGS polish by
 *   requestStop (the signal's own code path) and resumed reproduces the uninterrupted run's
 *   loss curve and final metrics; one uninterrupted run serves both.
 *
 * solve and demo are in signals-solve-demo.test.ts, a file of its own that the runner runs beside this one.
 */
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { runCli } from '../../src/cli/run-cli.js';
import { trainConfigSchema } from '../../src/io/schemas/train-config.js';
import { requestStop, resetStop, stopRequested } from '../../src/runtime/stop.js';
import { trainRun, TrainingStopped } from '../../src/training/train-run.js';
import { start, stopAt } from './signal-process.js';
import { writeTally } from './tally.js';

const tmp = () => mkdtempSync(join(tmpdir(), 'mesofield-signal-'));
const counts = { tried: 0, 'clear error or stop': 0, 'correct answer': 0 };

/**
 * A small train config: a fixed cell on a coarse grid, small networks, a short warm start (what
 * is checked is the stop and the resume, not the fit), no L-BFGS: seconds per run.
 */
const TRAIN = {
  version: 2,
  kind: 'train',
  system: { chain: { type: 'diblock', f: 0.5 }, chiN: 15 },
  cell: { period: 3.7, nx: 32, ns: 40 },
  backend: 'wasm',
  networks: { field: { hidden: [16, 16] }, propagator: { hidden: [16, 16] } },
  collocation: { random: 64, resampleEvery: 40 },
  warmStart: { type: 'reference', adamSteps: 5 },
  training: { adamSteps: 4000, checkpointEvery: 10, logEvery: 10, lbfgsIterations: 0, evaluateEvery: 0 },
};

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
      // A progress line at every step (the test hook): the signal goes at the first Adam line,
      // not after the one-second throttle, so the run trains a step or two instead of a second's worth.
      const { p, r } = await stopAt(['train', cfg, '--out', out], /Adam \d+\/4000 steps/, sig, 120_000, { everyLine: true });
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
    writeFileSync(cfg, JSON.stringify({ ...TRAIN, training: { ...TRAIN.training, adamSteps: 40 } }));
    const out = join(dir, 'run');
    // A progress line at every step (the test hook): the kill lands at the step it names, and
    // 40 steps leave 19 after it (with the one-second throttle a short run could end between two lines).
    const p = start(['train', cfg, '--out', out], { everyLine: true });
    // Past step 20: the step-10 checkpoint is written whole (a kill at step 10 could land before it).
    const pastStep20 = /Adam (2[1-9]|3\d)\/40 steps/;
    p.killOn(pastStep20, 'SIGKILL');
    await p.waitFor(pastStep20, 120_000);
    expect((await p.code).signal).toBe('SIGKILL');
    const saved = checkpointStep(out);
    expect(saved % 10).toBe(0);
    // The killed run's lock is stale (its process is gone): the resume takes it over.
    expect(existsSync(join(out, '.mesofield-lock'))).toBe(true);
    // The resume in this process through the CLI entry function (the kill needed a process of
    // its own; the resume is the same command line, and tfjs is loaded here already).
    resetStop();
    const q = await runCli(['train', cfg, '--resume', out, '--json'], { capture: true });
    expect(q.code, q.stderr).toBe(0);
    expect(q.stderr).toMatch(new RegExp(`resumed from .*run at step ${saved}`));
    expect(existsSync(join(out, '.mesofield-lock'))).toBe(false);
    expect(checkpointStep(out)).toBe(40);
    counts['correct answer']++;
  });

  it('sweep: SIGINT between points saves the solved points and exits 130; the same command resumes', async () => {
    counts.tried++;
    const dir = tmp();
    const cfg = join(dir, 's.json');
    writeFileSync(cfg, JSON.stringify({ version: 2, kind: 'sweep', system: { chain: { type: 'diblock' } }, parameters: { chiN: { from: 12, to: 20, count: 20 }, f: [0.5], segmentRatio: [1] }, cell: { period: 'equilibrium', nx: 16, ns: 20 } }));
    const out = join(dir, 'sw');
    // A progress line after every point (the test hook): the signal is sent after point 1, and 19
    // period searches are left (about 1 s of work; with the one-second throttle the first line
    // could come after many points, so the sweep had to be far longer).
    const { p, r } = await stopAt(['sweep', cfg, '--out', out, '--workers', '1'], /point \d+\/20/, 'SIGINT', 120_000, { everyLine: true });
    expect(r.code, p.stderr()).toBe(130);
    expect(p.stderr()).toMatch(/stopped after (\d+) of 20 points; they are saved in .*shard-1-of-1\.json; run the same command again/);
    const done = Number(/stopped after (\d+) of 20/.exec(p.stderr())![1]);
    expect(done).toBeGreaterThan(0);
    expect(JSON.parse(readFileSync(join(out, 'shard-1-of-1.json'), 'utf8')).points.length).toBe(done);
    // The resume in this process through the CLI entry function: the same command line again.
    resetStop();
    const q = await runCli(['sweep', cfg, '--out', out, '--workers', '1', '--json'], { capture: true });
    expect(q.code, q.stderr).toBe(0);
    expect(q.stderr).toMatch(new RegExp(`resuming .* ${done} of 20 points already saved`));
    expect(JSON.parse(readFileSync(join(out, 'shard-1-of-1.json'), 'utf8')).points.length).toBe(20);
    counts['clear error or stop']++;
  });
});

describe('resume fidelity', () => {
  // One uninterrupted run serves every stop below: the Adam phase with field updates every 10
  // steps (the lamella pinned at the first, step 10), then an L-BFGS polish.
  const base = trainConfigSchema.parse({ ...TRAIN, cell: { period: 'equilibrium', nx: 32, ns: 40 }, training: { ...TRAIN.training, adamSteps: 30, fieldUpdateEvery: 10, fieldFitSteps: 30, lbfgsIterations: 10, lbfgsCycles: 1 } });
  let wholeRun: ReturnType<typeof trainRun> | undefined;
  const uninterrupted = () => (wholeRun ??= trainRun({ config: base, backend: 'wasm' }));
  let whole: Awaited<ReturnType<typeof trainRun>>;
  const rel = (x: number, y: number) => Math.abs(x / y - 1);
  const sameEnd = (resumed: typeof whole) => {
    expect(rel(resumed.metrics.errors.phiA.relativeL2, whole.metrics.errors.phiA.relativeL2)).toBeLessThan(1e-6);
    expect(rel(resumed.metrics.errors.freeEnergyError, whole.metrics.errors.freeEnergyError)).toBeLessThan(1e-6);
  };
  const curve = (h: typeof whole.history, keep: (e: (typeof whole.history)[number]) => boolean) => h.filter(keep).map((e) => e.total);
  const sameCurve = (a: number[], b: number[]) => {
    expect(b.length).toBe(a.length);
    for (let i = 0; i < a.length; i++) expect(Math.abs(b[i] / a[i] - 1)).toBeLessThan(1e-6);
  };

  it('a run stopped at step 15, in the field-update phase, by the stop flag and resumed reproduces the uninterrupted run', async () => {
    counts.tried++;
    whole = await uninterrupted();
    const dir = join(tmp(), 'run');
    resetStop();
    const stopped = await trainRun({ config: base, outDir: dir, backend: 'wasm', shouldStop: stopRequested, onProgress: (p) => p.step >= 15 && !stopRequested() && requestStop('SIGINT') }).catch((e) => e);
    resetStop();
    expect(stopped).toBeInstanceOf(TrainingStopped);
    expect(checkpointStep(dir)).toBe(15);
    // The field updates' pin (taken at step 10) is in the checkpoint: the resume holds the same phase.
    const saved = JSON.parse(readFileSync(join(dir, 'checkpoint.json'), 'utf8')) as { fieldPin: { periods: number; phase: number } | null };
    expect(saved.fieldPin).not.toBeNull();
    const resumed = await trainRun({ config: base, resumeDir: dir, outDir: dir, backend: 'wasm' });
    // The loss curve after the stop (field updates at steps 20 and 30 included) and the polish, to float32 rounding (the networks run in float32).
    sameCurve(
      curve(whole.history, (e) => (e.stage === 'adam' && e.step > 15) || e.stage === 'lbfgs'),
      curve(resumed.history, (e) => (e.stage === 'adam' && e.step > 15) || e.stage === 'lbfgs'),
    );
    // The reference it is judged by is the same lamella (same phase), so the final metrics agree.
    expect(resumed.reference.phi.A[0]).toBeCloseTo(whole.reference.phi.A[0], 9);
    sameEnd(resumed);
    counts['correct answer']++;
    // Changed settings on resume are refused with the differences listed, never silently ignored.
    counts.tried++;
    const changed = { ...base, training: { ...base.training, learningRate: base.training.learningRate * 2 } };
    await expect(trainRun({ config: changed, resumeDir: dir, outDir: dir, backend: 'wasm' })).rejects.toThrow(/the config differs from the one the checkpoint was trained with[\s\S]*training\.learningRate: checkpoint 0\.002, config 0\.004/);
    counts['clear error or stop']++;
  });

  it('a run stopped at L-BFGS iteration 4 by the stop flag and resumed ends where the uninterrupted run ends', async () => {
    counts.tried++;
    whole = await uninterrupted();
    const dir = join(tmp(), 'run');
    resetStop();
    const stopped = await trainRun({ config: base, outDir: dir, backend: 'wasm', shouldStop: stopRequested, onLbfgs: (it) => it >= 4 && !stopRequested() && requestStop('SIGTERM') }).catch((e) => e);
    resetStop();
    expect(stopped).toBeInstanceOf(TrainingStopped);
    expect(String(stopped.message)).toMatch(/interrupted in the L-BFGS polish after \d+ iterations .*a resume repeats the polish from there/);
    expect(checkpointStep(dir)).toBe(30);
    const resumed = await trainRun({ config: base, resumeDir: dir, outDir: dir, backend: 'wasm' });
    // The polish's loss curve, iteration by iteration, to float32 rounding.
    sameCurve(
      curve(whole.history, (e) => e.stage === 'lbfgs'),
      curve(resumed.history, (e) => e.stage === 'lbfgs'),
    );
    sameEnd(resumed);
    counts['correct answer']++;
  });
});

afterAll(() => {
  // Every case here ends in a stop or a refusal it expects (clear) or in a checked answer (correct); a failure fails the test.
  writeTally('signals', { 'signals and resume': { tried: counts.tried, 'clear error': counts['clear error or stop'], 'correct answer': counts['correct answer'], wrong: counts.tried - counts['clear error or stop'] - counts['correct answer'] } });
  process.stdout.write(`\nsignals and resume: tried ${counts.tried}, clear error or stop ${counts['clear error or stop']}, correct answer ${counts['correct answer']}\n`);
});

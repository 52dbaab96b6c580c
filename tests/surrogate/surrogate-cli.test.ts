/**
 * `mesofield train` on a surrogate config, `predict` (range refusal, extrapolation warning,
 * JSON and CSV output, bad flags) and `report` on the checkpoint, run as a user would.
 * The surrogate here is tiny (3 anchors, 2 held-out points): these tests check the commands,
 * tests/surrogate/surrogate.test.ts checks the accuracy. One predict runs as a process (its
 * start-up, output and exit code as a user sees them, and the Ctrl-C case); the others run
 * through the same command-line function in this process (src/cli/run-cli.ts, as the fault
 * suite does), because each predict process spends about 1.9 s of CPU loading tfjs (measured)
 * before it reads a flag.
 */
import { existsSync, mkdirSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { runCli as runCliInProcess } from '../../src/cli/run-cli.js';
import { resetStop } from '../../src/runtime/stop.js';
import { runCli } from '../helpers/run-cli.js';
import { stopAt } from '../faults/signal-process.js';

const work = mkdtempSync(join(tmpdir(), 'mesofield-surrogate-cli-'));
const configPath = join(work, 'tiny.surrogate.json');
const ck = join(work, 'ck');

/** The command line in this process, output captured (tfjs then loads once for the file). */
async function here(args: string[]) {
  resetStop();
  try {
    return await runCliInProcess(args, { capture: true });
  } finally {
    resetStop();
  }
}

describe('surrogate commands', () => {
  let train: ReturnType<typeof runCli>;
  beforeAll(() => {
    writeFileSync(
      configPath,
      JSON.stringify({
        version: 2,
        kind: 'surrogate',
        backend: 'wasm',
        parameters: { chiN: { min: 13, max: 17, anchors: 3 } },
        cell: { nx: 32, ns: 60 },
        warmStart: { extraSolves: 2, lbfgsIterations: 150 },
        training: { rounds: 1, pointsPerRound: 4 },
        evaluation: { random: 0 },
      }),
    );
    train = runCli(['train', configPath, '--out', ck], { timeoutMs: 120_000 });
  });

  it('train writes a surrogate checkpoint and prints the held-out error and timing', () => {
    expect(train.code, train.stderr).toBe(0);
    expect(train.stdout).toMatch(/trained surrogate over χN in \[13, 17\] \(3 anchors\)/);
    expect(train.stdout).toMatch(/held-out \(2 points\): φA relative L2 max \d\.\d\de-\d/);
    expect(train.stdout).toMatch(/query [\d.]+ ms after start-up/);
    expect(train.stderr).toMatch(/train: physics rounds 1\/1 rounds \| SCFT residual .* left/);
    for (const f of ['checkpoint.json', 'weights.bin', 'metrics.json', 'reference.json', 'network.json']) expect(existsSync(join(ck, f)), f).toBe(true);
    const file = JSON.parse(readFileSync(join(ck, 'checkpoint.json'), 'utf8'));
    expect(file.kind).toBe('surrogate-checkpoint');
    expect(file.provenance.backend).toBe('wasm');
    expect(file.metrics.heldOut.map((h: { point: { chiN: number } }) => h.point.chiN)).toEqual([14, 16]);
  });

  it('train refuses --adam-steps and --resume for a surrogate config (exit 2, naming the flag)', async () => {
    const r = await here(['train', configPath, '--adam-steps', '10', '--out', join(work, 'x')]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/--adam-steps: got "10"; a surrogate's Adam steps are warmStart.adamSteps/);
    const resume = await here(['train', configPath, '--resume', ck]);
    expect(resume.code).toBe(2);
    expect(resume.stderr).toMatch(/--resume: got ".*"; a surrogate run cannot be resumed/);
  });

  it('predict prints period, F, Q and the profile inside the range', () => {
    const r = runCli(['predict', ck, '--chiN', '15.5', '--points', '8']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toMatch(/surrogate at χN = 15\.5: lamellar \(compared with disorder only\), period 3\.\d+ Rg/);
    expect(r.stdout).toMatch(/F = 3\.\d+ kT\/chain/);
    const rows = r.stdout.trim().split('\n').filter((l) => /^\s+\d/.test(l));
    expect(rows.length).toBe(8);
    expect(r.stderr).toMatch(/predict: loaded in [\d.]+ s .*; query [\d.]+ ms/);
  });

  it('predict refuses a point outside the trained range (exit 2) and warns with --allow-extrapolation', async () => {
    const out = await here(['predict', ck, '--chiN', '18']);
    expect(out.code).toBe(2);
    expect(out.stderr).toMatch(/--chiN: got 18; the surrogate was trained for χN in \[13, 17\]/);
    expect(out.stderr).toMatch(/--allow-extrapolation/);
    const ex = await here(['predict', ck, '--chiN', '18', '--allow-extrapolation', '--json']);
    expect(ex.code, ex.stderr).toBe(0);
    expect(ex.stderr).toMatch(/warning: extrapolating: --chiN: got 18/);
    const j = JSON.parse(ex.stdout);
    expect(j.extrapolated).toBe(true);
    expect(j.kind).toBe('prediction');
    expect(j.phiA.length).toBe(32);
  });

  it('predict writes prediction.json and profile.csv into --out DIR and checks its flags', async () => {
    const json = join(work, 'p', 'prediction.json');
    const csv = join(work, 'p5', 'profile.csv');
    expect((await here(['predict', ck, '--chiN', '14', '--out', join(work, 'p')])).code).toBe(0);
    const j = JSON.parse(readFileSync(json, 'utf8'));
    expect(j.point.chiN).toBe(14);
    expect(j.trainedRange).toEqual([{ name: 'chiN', min: 13, max: 17 }]);
    expect((await here(['predict', ck, '--chiN', '14', '--points', '5', '--out', join(work, 'p5')])).code).toBe(0);
    const lines = readFileSync(csv, 'utf8').trim().split('\n');
    expect(lines[0]).toBe('x,t,phiA,phiB,wA,wB');
    expect(lines.length).toBe(6);
    // Five points are read off the 32-point solve by trigonometric interpolation: the JSON of 32 points holds the same φA at x = 0.
    expect(Number(lines[1].split(',')[2])).toBeCloseTo(j.phiA[0], 10);
    const missing = await here(['predict', ck]);
    expect(missing.code).toBe(2);
    expect(missing.stderr).toMatch(/--chiN: missing; the surrogate was trained for χN in \[13, 17\]: give a value/);
    const bad = await here(['predict', ck, '--chiN', '15', '--points', '0']);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toMatch(/--points: got 0; allowed: a whole number from 2 to 8192/);
  });

  it('predict: SIGINT while it loads stops it before it writes, exit 130; --out is not created (fault case, src/cli/short-run-stop.ts)', async () => {
    const out = join(work, 'p-stopped');
    // The tfjs start-up and the weights take far longer than the wait for the signal after the loading line.
    const { p, r } = await stopAt(['predict', ck, '--chiN', '14', '--out', out], /predict: loading the surrogate/, 'SIGINT');
    expect(r.code, p.stderr()).toBe(130);
    expect(p.stderr()).toMatch(/predict: Ctrl-C: stopping the predict; nothing will be written/);
    expect(p.stderr()).toMatch(/predict stopped by a signal before it finished; nothing was written \(.*p-stopped was left as it was\)/);
    expect(existsSync(out)).toBe(false);
  }, 120_000);

  it('predict on something that is not a surrogate checkpoint says so, and evaluate on a surrogate (exit 2)', async () => {
    // A directory whose checkpoint.json is of the single-point kind (predict reads the kind first).
    const other = join(work, 'other');
    mkdirSync(other);
    writeFileSync(join(other, 'checkpoint.json'), JSON.stringify({ kind: 'checkpoint' }));
    const r = await here(['predict', other, '--chiN', '15']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/predict needs a surrogate checkpoint/);
    // And the other way round: evaluate (single-point networks) points a surrogate to predict and report.
    const ev = await here(['evaluate', ck]);
    expect(ev.code).toBe(2);
    expect(ev.stderr).toMatch(/a surrogate checkpoint; its error map .* is in .*metrics\.json/);
  });

  it('report draws the error map of the checkpoint', async () => {
    const r = await here(['report', ck, '--out', join(work, 'report'), '--format', 'png']);
    expect(r.code, r.stderr).toBe(0);
    for (const f of ['surrogate-error', 'surrogate-free-energy-error', 'surrogate-period', 'surrogate-rounds', 'profiles-phi']) expect(existsSync(join(work, 'report', 'figures', `${f}.png`)), f).toBe(true);
  });

  it('schema surrogate prints the JSON Schema of the kind', async () => {
    const r = await here(['schema', 'surrogate']);
    expect(r.code).toBe(0);
    const s = JSON.parse(r.stdout);
    expect(s.properties.kind.const).toBe('surrogate');
    expect(s.properties.parameters.properties.chiN).toBeDefined();
  });
});

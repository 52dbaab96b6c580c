/** `mesofield sweep` as a user runs it: shards, skip on rerun, merge, and bad input (exit 2). */
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { runCli as runInProcess } from '../../src/cli/run-cli.js';
import { runCli } from '../helpers/run-cli.js';

const tmp = () => mkdtempSync(join(tmpdir(), 'mesofield-sweep-cli-'));
/** The same command code in this process through the CLI's entry function (no node start-up); each kind of refusal keeps one case through the built program. */
const inProcess = (args: string[]) => runInProcess(args, { capture: true });

function writeConfig(dir: string, parameters: unknown, extra: Record<string, unknown> = {}): string {
  const p = join(dir, 'grid.sweep.json');
  writeFileSync(p, JSON.stringify({ version: 2, kind: 'sweep', parameters, cell: { nx: 32, ns: 40 }, ...extra }));
  return p;
}

describe('mesofield sweep', () => {
  it('runs two shards, skips a finished one on rerun, and merges them into the table', async () => {
    const dir = tmp();
    const cfg = writeConfig(dir, { chiN: [11, 13, 15] });
    const out = join(dir, 'out');
    const one = runCli(['sweep', cfg, '--shard', '1/2', '--out', out, '--json']);
    expect(one.code, one.stderr).toBe(0);
    expect(one.stderr).toMatch(/sweep: point 2\/2 .*points\/s .* left/);
    const shard = JSON.parse(one.stdout);
    expect(shard.kind).toBe('sweep-shard');
    expect(shard.points.map((p: { index: number }) => p.index)).toEqual([0, 2]);
    // The first shard ran as a user starts it (exit code, stdout and stderr apart); the rest run the
    // same command lines in this process (no node start-up each).
    expect((await inProcess(['sweep', cfg, '--shard', '2/2', '--out', out, '--workers', '1', '--quiet'])).code).toBe(0);
    const again = await inProcess(['sweep', cfg, '--shard', '1/2', '--out', out]);
    expect(again.code).toBe(0);
    expect(again.stderr).toMatch(/shard-1-of-2 of this config .* already complete .*skipped/);
    expect(again.stdout).toMatch(/lamellar/);

    const merged = join(dir, 'merged');
    const m = await inProcess(['sweep', '--merge', out, '--out', merged]);
    expect(m.code, m.stderr).toBe(0);
    expect(m.stderr).toMatch(/merged 2 shard files \(3 points\)/);
    const table = JSON.parse(readFileSync(join(merged, 'sweep.json'), 'utf8'));
    expect(table.points.map((p: { chiN: number; phase: string }) => [p.chiN, p.phase])).toEqual([[11, 'lamellar'], [13, 'lamellar'], [15, 'lamellar']]);
    expect(readFileSync(join(merged, 'sweep.csv'), 'utf8').split('\n')[0]).toMatch(/^index,chiN,f,segmentRatio,phase,period,freeEnergy,/);

    const missing = runCli(['sweep', '--merge', join(out, 'shard-2-of-2.json'), '--out', join(dir, 'bad')]);
    expect(missing.code).toBe(2);
    expect(missing.stderr).toMatch(/missing points 0, 2/);
    expect(existsSync(join(dir, 'bad'))).toBe(false);
  });

  const badShards = ['0/2', '3/2', '2', 'a/b', '1/0', '-1/2'];
  it(`bad --shard values (${badShards.join(', ')}) exit 2 naming the flag, the value and what is allowed`, async () => {
    const dir = tmp();
    const cfg = writeConfig(dir, { chiN: [12] });
    for (const [i, s] of badShards.entries()) {
      const args = ['sweep', cfg, `--shard=${s}`, '--out', join(dir, 'out')];
      const r = i === 0 ? runCli(args) : await inProcess(args);
      expect(r.code, s).toBe(2);
      expect(r.stderr).toContain(`--shard: got ${JSON.stringify(s)}; allowed: I/N with whole numbers 1 ≤ I ≤ N`);
      expect(r.stdout).toBe('');
    }
    expect(existsSync(join(dir, 'out'))).toBe(false);
  });

  it('other bad input exits 2: workers, a file start, flag mixes; any f is solved (each block takes its own contour steps)', async () => {
    const dir = tmp();
    const cfg = writeConfig(dir, { chiN: [12] });
    const workers = await inProcess(['sweep', cfg, '--workers', '1.5']);
    expect(workers.code).toBe(2);
    expect(workers.stderr).toMatch(/--workers: got 1\.5; allowed: a whole number from 1 to 64/);
    // f = 0.33 gives no even whole number of steps of one size on both blocks; per-block steps solve it.
    const anyF = await inProcess(['sweep', writeConfig(dir, { chiN: [14], f: [0.5, 0.33] }), '--out', join(dir, 'f033'), '--json']);
    expect(anyF.code).toBe(0);
    expect(JSON.parse(anyF.stdout).points.map((p: { phase: string }) => p.phase)).toEqual(['lamellar', 'lamellar']);
    const range = await inProcess(['sweep', writeConfig(dir, { chiN: { from: 10, to: 12, count: 0 } })]);
    expect(range.code).toBe(2);
    expect(range.stderr).toMatch(/parameters\.chiN/);
    const file = await inProcess(['sweep', writeConfig(dir, { chiN: [12] }, { solver: { start: { type: 'file', path: 'x.json' } } })]);
    expect(file.code).toBe(2);
    expect(file.stderr).toMatch(/solver\.start\.type: got "file"; start "file" is not allowed in a sweep/);
    expect((await inProcess(['sweep', cfg, '--merge', dir, '--out', dir])).stderr).toMatch(/config: got .* with --merge/);
    expect((await inProcess(['sweep', '--merge', dir])).stderr).toMatch(/--out: missing; --merge needs/);
    expect((await inProcess(['sweep'])).code).toBe(2);
    expect(existsSync(join(dir, 'o'))).toBe(false);
  });

  it('points the solver gives up on are saved as failed, with the reason, and the run exits 3', () => {
    const dir = tmp();
    const out = join(dir, 'out');
    const r = runCli(['sweep', writeConfig(dir, { chiN: [12, 14] }, { solver: { maxIterations: 3 } }), '--out', out, '--workers', '1']);
    expect(r.code).toBe(3);
    expect(r.stderr).toMatch(/2 of 2 sweep points failed \(0–1\)/);
    const table = JSON.parse(readFileSync(join(out, 'sweep.json'), 'utf8'));
    expect(table.points.map((p: { phase: string }) => p.phase)).toEqual(['failed', 'failed']);
    expect(table.points[0].notes[0]).toMatch(/did not converge/);
  });

  it('schema knows the sweep kind', async () => {
    const r = await inProcess(['schema', 'sweep']);
    expect(r.code).toBe(0);
    expect(JSON.parse(r.stdout).properties.kind.const).toBe('sweep');
  });

  it('the sweep modules do not load tfjs', () => {
    // tfjs-core creates globalThis._tfengine when it is evaluated (see tests/autodiff/lazy-load.test.ts).
    const dist = fileURLToPath(new URL('../../dist/', import.meta.url));
    const mods = ['sweep/run-sweep.js', 'sweep/merge.js', 'cli/commands/sweep.js'].map((m) => `await import(${JSON.stringify(dist + m)});`);
    const r = spawnSync(process.execPath, ['--input-type=module', '-e', `${mods.join('\n')}\nconsole.log(typeof globalThis._tfengine);`], { encoding: 'utf8' });
    expect(r.status, r.stderr).toBe(0);
    expect(r.stdout.trim()).toBe('undefined');
  });
});

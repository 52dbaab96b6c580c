/** `mesofield train` and `evaluate` as a user runs them (split from trainer-single-chain.test.ts so the two files run side by side). */
import { existsSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli as runInProcess } from '../../src/cli/run-cli.js';
import { runCli } from '../helpers/run-cli.js';
import { fieldSystem, tmp } from './trainer-configs.js';

describe('mesofield train / evaluate CLI', () => {
  it('trains from a config file, writes a checkpoint and evaluates it', () => {
    const d = tmp();
    const p = join(d, 'field.train.json');
    writeFileSync(p, JSON.stringify({ version: 2, kind: 'train', system: fieldSystem, cell: { period: 4, nx: 32, ns: 50 }, warmStart: { type: 'none' }, training: { adamSteps: 30 }, backend: 'wasm' }));
    const out = join(d, 'ck');
    const r = runCli(['train', p, '--out', out, '--json', '--report'], { timeoutMs: 120_000 });
    expect(r.code).toBe(0);
    expect(existsSync(join(out, 'report', 'report.pdf'))).toBe(true);
    expect(r.stderr).toMatch(/Adam 30\/30 steps \| loss .* steps\/s \| .* left/);
    const m = JSON.parse(r.stdout);
    expect(m.backend).toBe('wasm');
    const ev = runCli(['evaluate', out, '--json', '--backend', 'wasm'], { timeoutMs: 120_000 });
    expect(ev.code).toBe(0);
    expect(JSON.parse(ev.stdout).phiA.relativeL2).toBe(m.errors.phiA.relativeL2);
  });

  // The refusals run in this process through the CLI entry function (no node start-up each);
  // the run above is train's case as a user starts it.
  it('bad train input exits 2 naming the field', async () => {
    const d = tmp();
    const p = join(d, 'bad.json');
    writeFileSync(p, JSON.stringify({ version: 2, kind: 'train', system: fieldSystem, collocation: { nodesPerBlock: 7 } }));
    const r = await runInProcess(['train', p], { capture: true });
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/collocation\.nodesPerBlock: got 7; must be even/);
    const r2 = await runInProcess(['train', p, '--backend', 'gpu'], { capture: true });
    expect(r2.code).toBe(2);
  });
});

import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli } from '../../src/cli/run-cli.js';

// In a file of its own so that the test runner can run it beside the long estimator tests.
// The command lines run in this process through the CLI entry function (src/cli/run-cli.ts):
// invert as a process of its own (exit code, stdout and stderr apart) is tests/inverse/cli.test.ts's.
describe('mesofield invert --method both', () => {
  it('reports both estimators and their agreement', async () => {
    const d = mkdtempSync(join(tmpdir(), 'mesofield-netinv-'));
    const csv = join(d, 'p', 'profile.csv');
    const synth = await runCli(['synth', '--f', '0.5', '--chiN', '15', '--points', '48', '--noise', '0.02', '--seed', '3', '--out', join(d, 'p'), '--quiet'], { capture: true });
    expect(synth.code, synth.stderr).toBe(0);
    const out = join(d, 'run');
    // The plumbing of both estimators, not their accuracy (network.test.ts, network-noise.test.ts),
    // with the adam-lbfgs strategy (the default least-squares one: the signal and flag cases in
    // tests/faults, and tests/inverse/network-least-squares-*.test.ts): a 16 × 20 model grid and 50 Adam steps with a field/χN update after 25 of them (a config
    // file, under the flags), so that the network's χN moves off the classical one; a 20-step
    // warm start (network.warmStartSteps, default 400). The two seeds train one after the other
    // (--workers 1: no worker thread loading tfjs again; the threads are tests/inverse/seed-workers.test.ts's).
    const cfg = join(d, 'invert.json');
    writeFileSync(cfg, JSON.stringify({ version: 2, kind: 'invert', system: { chain: { type: 'diblock', f: 0.5 } }, network: { fieldUpdateEvery: 25, warmStartSteps: 20 } }));
    const r = await runCli(['invert', csv, cfg, '--method', 'both', '--strategy', 'adam-lbfgs', '--seeds', '2', '--workers', '1', '--adam-steps', '50', '--lbfgs-iterations', '0', '--nx', '16', '--ns', '20', '--backend', 'wasm', '--json', '--out', out, '--report'], { capture: true });
    expect(r.code, r.stderr).toBe(0);
    const res = JSON.parse(r.stdout);
    expect(Object.keys(res.estimators).sort()).toEqual(['classical', 'network']);
    expect(res.estimators.network.runs.length).toBe(2);
    // The update after 25 steps ran: χN left the classical estimate it started from.
    expect(res.estimators.network.chiN).not.toBe(res.estimators.classical.chiN);
    expect(res.estimators.network.runs[0].trajectory.length).toBeGreaterThan(1);
    expect(res.estimators.network.intervalMethod).toMatch(/seed/);
    expect(res.agreement.compared).toBe(true);
    expect(JSON.parse(readFileSync(join(out, 'result.json'), 'utf8')).estimators.network.backend).toBe('wasm');
    // synth wrote its truth beside the CSV: the result measures both estimates against it.
    expect(res.truth.chiN).toBe(15);
    expect(res.truth.estimators.classical.error).toBeCloseTo(res.estimators.classical.chiN - 15, 12);
    expect(res.truth.estimators.network.exchangeFieldRelativeL2).toBeGreaterThan(0);
    expect(res.truth.estimators.network.exchangeFieldRelativeL2).toBeLessThan(0.2);
    // The report draws the network's χN trajectory against the classical estimate.
    const text = execFileSync('pdftotext', [join(out, 'report', 'report.pdf'), '-'], { encoding: 'utf8' });
    expect(text).toMatch(/network estimator's χN at each of its steps/);
    expect(text).toMatch(/classical estimate/);
    // … and says on its title page what the network χN rests on (pdftotext may break the line).
    expect(text.replace(/\s+/g, ' ')).toMatch(/Network χN \(adam-lbfgs strategy\): offset and period from the classical fit/);
  });
});

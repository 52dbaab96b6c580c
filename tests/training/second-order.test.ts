/**
 * The second-order phase of a train run (training/second-order-phase.ts): Levenberg–Marquardt
 * on the float64 SCFT residual system. The check is against the spectral reference solved in
 * the same run (an independent method: pseudo-spectral MDE with Richardson extrapolation),
 * for a chain in a prescribed field, where the MDE is the whole system.
 */
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { trainConfigSchema } from '../../src/io/schemas/train-config.js';
import { trainRun } from '../../src/training/train-run.js';
import { runCli } from '../helpers/run-cli.js';

const externalFieldSystem = {
  chain: { type: 'homopolymer', species: 'A' },
  externalField: { A: { type: 'cosine', amplitude: 2.0, mode: 1, offset: 0 } },
};

describe('second-order phase', () => {
  it('a chain in a cosine field: from a cold start, φA within 1e-3 of the spectral reference in 25 LM iterations; the best state is kept and said', async () => {
    const config = trainConfigSchema.parse({
      version: 2,
      kind: 'train',
      system: externalFieldSystem,
      cell: { period: 4.0, nx: 64, ns: 100 },
      networks: { propagator: { hidden: [12, 12], fourierModes: 3 } },
      collocation: { nx: 32, nodesPerBlock: 32, random: 0 },
      warmStart: { type: 'none' },
      training: { adamSteps: 0, evaluateEvery: 1, secondOrderIterations: 25, secondOrder: { evaluateEvery: 5 } },
    });
    const r = await trainRun({ config, backend: 'wasm' });
    const t = r.metrics.training;
    const so = r.history.filter((h) => h.stage === 'second-order');
    expect(so.length).toBe(t.secondOrder!.iterations);
    expect(so.map((h) => h.secondOrderIterations)).toEqual(so.map((_, i) => i + 1));
    // Levenberg–Marquardt accepts only steps that lower the loss.
    for (let i = 1; i < so.length; i++) expect(so[i].total).toBeLessThanOrEqual(so[i - 1].total);
    // The held state is the evaluated one with the lowest error, and the final metrics measure it.
    const measured = so.filter((h) => h.phiError !== undefined);
    const lowest = Math.min(...measured.map((h) => h.phiError!));
    expect(t.holds.chosenBy).toBe('lowest-reference-error');
    expect(t.holds.phiError).toBe(lowest);
    expect(Math.abs(r.metrics.errors.phiA.relativeL2 - lowest)).toBeLessThan(1e-3 * lowest + 1e-7);
    expect(r.metrics.errors.phiA.relativeL2).toBeLessThan(1e-3);
    expect(r.metrics.verdict.ok).toBe(true);
    expect(r.metrics.phase).toBe('single-chain');
  }, 120_000);
});

describe('train verdict', () => {
  it('a run that ends above training.targetPhiError warns in text and JSON, is not given a phase, and exits 3', () => {
    const dir = mkdtempSync(join(tmpdir(), 'mesofield-verdict-'));
    const cfg = join(dir, 'short.train.json');
    writeFileSync(
      cfg,
      JSON.stringify({
        version: 2,
        kind: 'train',
        system: { chain: { type: 'diblock', f: 0.5 }, chiN: 15 },
        // A fixed cell near the equilibrium period (3.71 Rg, README) spares each run its period search.
        cell: { period: 3.7, nx: 32, ns: 60 },
        networks: { field: { hidden: [8] }, propagator: { hidden: [8, 8] } },
        collocation: { nx: 16, nodesPerBlock: 8, random: 0 },
        warmStart: { type: 'none' },
        training: { adamSteps: 3, evaluateEvery: 1, targetPhiError: 1e-6 },
      }),
    );
    const out = join(dir, 'run');
    const text = runCli(['train', cfg, '--out', out, '--backend', 'wasm', '--quiet'], { timeoutMs: 120_000 });
    expect(text.code).toBe(3);
    expect(text.stdout).toMatch(/warning: φA relative L2 error .* is above the target training\.targetPhiError = 0\.000001/);
    expect(text.stdout).toMatch(/warning: the network.s φA amplitude .* is below 0\.5 of the reference.s .*: its density is not ordered where the reference is/);
    expect(text.stdout).toMatch(/phase: unconfirmed/);
    expect(text.stderr).toMatch(/ended above its target/);
    expect(text.stderr).not.toMatch(/at .*\.js:\d+/);
    const metrics = JSON.parse(readFileSync(join(out, 'metrics.json'), 'utf8'));
    expect(metrics.verdict.ok).toBe(false);
    expect(metrics.verdict.aboveTarget).toBe(true);
    expect(metrics.phase).toBe('unconfirmed');
    expect(metrics.phase).not.toBe('lamellar');
    // The checkpoint says which state it holds: the Adam step with the lowest error measured.
    const ckpt = JSON.parse(readFileSync(join(out, 'checkpoint.json'), 'utf8'));
    expect(ckpt.holds.stage).toBe('adam');
    expect(ckpt.holds.chosenBy).toBe('lowest-reference-error');
    expect(ckpt.holds.step).toBe(3);
    const network = JSON.parse(readFileSync(join(out, 'network.json'), 'utf8'));
    expect(JSON.stringify(network)).toMatch(/not confirmed against the reference/);
    const json = runCli(['train', cfg, '--out', join(dir, 'run2'), '--backend', 'wasm', '--quiet', '--json'], { timeoutMs: 120_000 });
    expect(json.code).toBe(3);
    const parsed = JSON.parse(json.stdout);
    expect(parsed.verdict.warnings[0]).toMatch(/above the target/);
    expect(json.stderr).toMatch(/train: warning: φA relative L2 error/);
  }, 240_000);
});

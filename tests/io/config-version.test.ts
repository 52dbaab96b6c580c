/**
 * Configs version 2 (docs/vocabulary.md): every shipped config validates, and a version-1
 * config is refused with the exact renames it needs (the choice documented in
 * src/io/schemas/config-version.ts: refuse, not migrate).
 */
import { mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { InputError, parseOrThrow } from '../../src/io/errors.js';
import { CONFIG_SCHEMAS } from '../../src/io/schemas/config-schemas.js';
import { runCli } from '../../src/cli/run-cli.js';

describe('config version 2', () => {
  it('every config in configs/ validates against the schema of its kind', () => {
    const files = readdirSync('configs').filter((f) => f.endsWith('.json'));
    expect(files.length).toBeGreaterThan(5);
    for (const f of files) {
      const raw = JSON.parse(readFileSync(join('configs', f), 'utf8')) as { kind: string; version: number };
      expect(raw.version, f).toBe(2);
      expect(() => parseOrThrow(CONFIG_SCHEMAS[raw.kind], raw, f), f).not.toThrow();
    }
  });

  const refused = (raw: unknown): string => {
    try {
      parseOrThrow(CONFIG_SCHEMAS[(raw as { kind: string }).kind], raw, 'old.json');
    } catch (e) {
      expect(e).toBeInstanceOf(InputError);
      return (e as Error).message;
    }
    throw new Error('a version-1 config was accepted');
  };

  it('a version-1 sweep lists each rename it needs', () => {
    const msg = refused({
      version: 1,
      kind: 'sweep',
      chain: { type: 'diblock' },
      grid: { chiN: [12], segmentLengthRatio: [1] },
      cell: { period: 'optimize' },
      reference: { tolerance: 1e-8 },
    });
    expect(msg).toMatch(/^old\.json: a version-1 "sweep" config/);
    for (const line of ['"version": 1 → "version": 2', 'reference → solver', 'chain → system.chain', 'grid → parameters', 'grid.segmentLengthRatio → parameters.segmentRatio', 'cell.period "optimize" → "equilibrium"']) {
      expect(msg).toContain(line);
    }
  });

  it('a version-1 invert and train name their moved keys; a segment-length pair gets its ratio and the unit warning', () => {
    const inv = refused({ version: 1, kind: 'invert', system: { chain: { type: 'diblock', f: 0.5 } }, grid: { nx: 32 }, period: 'free', network: { steps: 100 } });
    for (const line of ['grid.nx → cell.nx', 'period → cell.period', 'network.steps → network.adamSteps']) expect(inv).toContain(line);
    expect(inv).not.toContain('grid.ns');
    const tr = refused({
      version: 1,
      kind: 'train',
      system: { chain: { type: 'diblock', f: 0.5, segmentLengths: { A: 1, B: 2 } } },
      training: { steps: 10 },
      warmStart: { steps: 5 },
    });
    expect(tr).toContain('training.steps → training.adamSteps');
    expect(tr).toContain('warmStart.steps → warmStart.adamSteps');
    // b_A/b_B = 1/2; lengths in Rg of a chain of segment length b_B = 2 change by that factor.
    expect(tr).toMatch(/system\.chain\.segmentLengths → system\.chain\.segmentRatio \(b_A\/b_B\) \(here segmentRatio: 0\.5; .*factor 2\)/);
  });

  // In this process through the CLI entry function: the refusal's text and code, not a process's.
  it('the CLI exits 2 on a version-1 config and prints the renames', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'mesofield-v1-'));
    const p = join(dir, 'old.solve.json');
    writeFileSync(p, JSON.stringify({ version: 1, kind: 'solve', system: { chain: { type: 'diblock', f: 0.5 }, chiN: 15 }, cell: { period: 'optimize' } }));
    const r = await runCli(['solve', p], { capture: true });
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('a version-1 "solve" config');
    expect(r.stderr).toContain('cell.period "optimize" → "equilibrium"');
  });
});

/**
 * fit-spacing from the command line with a config file: periods D(N) made from a finer
 * reference (64 × 120 stress-free lamellae, in-process) than the fit's 32 × 60 model, no noise,
 * 1 % errors. Scenario of our own: f = 0.5, χ = 0.1, b = 0.7 nm, N = 150, 250, 400.
 */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { readFormat } from '../../src/io/formats/file-format.js';
import { spacingFitFileSchema } from '../../src/io/formats/measurement-fits.js';
import { LamellaModel } from '../../src/inverse/lamella-model.js';
import { runCli as runInProcess } from '../../src/cli/run-cli.js';
import { runCli } from '../helpers/run-cli.js';
import { pdfText } from '../reports/pdf-tools.js';
import { diblock } from './helpers.js';

const dir = mkdtempSync(join(tmpdir(), 'mesofield-spacing-cli-'));
const CHI = 0.1;
const B = 0.7;

describe('fit-spacing (CLI)', () => {
  it('recovers χ and b within the 95 % intervals from a config plus flags, writes result.json through its schema and the report page', () => {
    const fine = new LamellaModel({ chain: diblock(0.5), nx: 64, ns: 120 });
    const Ns = [150, 250, 400];
    const rows = Ns.map((N) => {
      const D = fine.equilibrium(CHI * N).period * B * Math.sqrt(N / 6);
      return `${N},${D},${0.01 * D}`;
    });
    const csv = join(dir, 'spacing.csv');
    writeFileSync(csv, `N,D_nm,dD_nm\n${rows.join('\n')}\n`);
    const cfg = join(dir, 'fit-spacing.json');
    writeFileSync(cfg, JSON.stringify({ version: 2, kind: 'fit-spacing', system: { chain: { type: 'diblock', f: 0.5 } }, cell: { nx: 64 }, chiRange: [0.08, 0.13] }));
    const out = join(dir, 'out');
    // --nx overrides the config's 64.
    // A longer limit than runCli's 60 s: under a load of ~20 on two cores this run was killed at
    // 60 s (exit −1) after 1 of ~40 χ values, measured.
    const r = runCli(['fit-spacing', csv, cfg, '--nx', '32', '--ns', '60', '--out', out, '--report'], { timeoutMs: 300_000 });
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toMatch(/^χ = [\d.]+ {3}68\.3 % \[/);
    expect(r.stderr).toMatch(/fit-spacing: χ values \d+\/~\d+ .* left/);
    const res = readFormat(join(out, 'result.json'), spacingFitFileSchema);
    expect((res.config as { cell: { nx: number } }).cell.nx).toBe(32);
    const i95 = res.intervals['95%'];
    expect(i95.chi[0]).toBeLessThan(CHI);
    expect(i95.chi[1]).toBeGreaterThan(CHI);
    expect(i95.b[0]).toBeLessThan(B);
    expect(i95.b[1]).toBeGreaterThan(B);
    const text = pdfText(join(out, 'report', 'report.pdf'));
    expect(text).toMatch(/Domain-spacing fit/);
    expect(text).toMatch(/What χ and b rest on/);
  });

  // In this process through the CLI entry function (the fit above is the built program's case).
  it('a bad config key is named with the file (exit 2)', async () => {
    const cfg = join(dir, 'bad.json');
    writeFileSync(cfg, JSON.stringify({ version: 2, kind: 'fit-spacing', system: { chain: { type: 'diblock', f: 0.5 } }, chiRange: [0.2, 0.1] }));
    const r = await runInProcess(['fit-spacing', join(dir, 'spacing.csv'), cfg], { capture: true });
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/bad\.json: chiRange: got \[0\.2, 0\.1\]; must be \[lo, hi\] with lo < hi/);
  });
});

/**
 * fit-bragg from the command line, on peaks of a finer reference solve than the fit uses:
 * `solve` on a 64 × 100 grid, `bragg-pattern` turns its profile into peaks (q in nm⁻¹ for
 * Rg = 6 nm), and the fit runs on 32 × 60. Scenario of our own: f = 0.3, χN = 18, 3 % errors
 * on the intensities (an absolute floor for the weak orders), no noise added, so the truth
 * must sit inside the intervals and the Rg implied by D must be the one the peaks were made with.
 */
import { existsSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { readFormat } from '../../src/io/formats/file-format.js';
import { braggFitFileSchema } from '../../src/io/formats/measurement-fits.js';
import { braggPatternFileSchema } from '../../src/io/formats/bragg-pattern.js';
import { runCli as runInProcess } from '../../src/cli/run-cli.js';
import { runCli } from '../helpers/run-cli.js';
import { pdfText } from '../reports/pdf-tools.js';

// The refusals run the command line in this process (src/cli/run-cli.ts, as tests/faults does):
// a node start-up each cost more than they do. The fits run the built program.
const inProcess = (args: string[]) => runInProcess(args, { capture: true });
const dir = mkdtempSync(join(tmpdir(), 'mesofield-bragg-cli-'));
const TRUE_CHIN = 18;
const RG_NM = 6;
const fit = ['--f', '0.3', '--nx', '32', '--ns', '60', '--chiN-range', '14,24'];

// Set-up in this process through the CLI entry function (solve's and bragg-pattern's own process
// cases are tests/cli/solve-cli.test.ts's and tests/inverse/measurements-cli.test.ts's).
async function makePeaks(): Promise<string> {
  const sol = join(dir, 'reference');
  const s = await inProcess(['solve', '--f', '0.3', '--chiN', String(TRUE_CHIN), '--period', 'equilibrium', '--nx', '64', '--ns', '100', '--out', sol, '--quiet']);
  expect(s.code, s.stderr).toBe(0);
  const p = await inProcess(['bragg-pattern', join(sol, 'solution.json'), '--orders', '4', '--rg-nm', String(RG_NM), '--json']);
  expect(p.code, p.stderr).toBe(0);
  const peaks = braggPatternFileSchema.parse(JSON.parse(p.stdout)).peaks;
  const rows = peaks.map((k) => `${k.order},${k.q},${1000 * k.relative!},${Math.max(30 * k.relative!, 0.3)}`);
  const path = join(dir, 'peaks.csv');
  writeFileSync(path, `order,q_per_nm,I,dI\n${rows.join('\n')}\n`);
  return path;
}

describe('fit-bragg (CLI)', () => {
  let peaks = '';
  beforeAll(async () => {
    peaks = await makePeaks();
  });

  it('recovers χN within its intervals and the Rg the peaks were made with; writes result.json through its schema and the report', async () => {
    const out = join(dir, 'fit');
    const r = runCli(['fit-bragg', peaks, ...fit, '--out', out, '--report']);
    expect(r.code, r.stderr).toBe(0);
    // Results on stdout, progress (with the time left) on stderr.
    expect(r.stdout).toMatch(/^χN = [\d.]+ {3}68\.3 % \[/);
    expect(r.stdout).not.toMatch(/left/);
    expect(r.stderr).toMatch(/evaluations \d+\/~?\d+ .* left/);
    const res = readFormat(join(out, 'result.json'), braggFitFileSchema);
    expect(res.intervals['95%'].lo).toBeLessThan(TRUE_CHIN);
    expect(res.intervals['95%'].hi).toBeGreaterThan(TRUE_CHIN);
    expect(Math.abs(res.chiN - TRUE_CHIN)).toBeLessThan(0.2);
    // D = Rg·L_eq(χN): at the fitted χN the implied Rg is the one used to make q (coarse grid: 1 %).
    expect(Math.abs(res.impliedRgNm - RG_NM) / RG_NM).toBeLessThan(0.01);
    expect(res.rgTie).toBeNull();
    expect(existsSync(join(out, 'report', 'figures', 'bragg-fit.png'))).toBe(true);
    expect(existsSync(join(out, 'report', 'figures', 'bragg-fit-profile.png'))).toBe(true);
    const text = pdfText(join(out, 'report', 'report.pdf'));
    expect(text).toMatch(/Bragg-peak fit/);
    expect(text).toMatch(/What this χN rests on/);
    // `report DIR` reads the result file again (kind bragg-fit) and draws the same pages.
    const again = await inProcess(['report', out, '--out', join(out, 'again'), '--quiet']);
    expect(again.code, again.stderr).toBe(0);
    expect(pdfText(join(out, 'again', 'report.pdf'))).toMatch(/Bragg-peak fit: χN = /);
  });

  it('ties D to a given Rg: the right Rg keeps the truth inside, an Rg 5 % too large pulls χN down (L_eq grows with χN)', async () => {
    // In this process through the CLI entry function (the built program runs the fit above).
    const right = await inProcess(['fit-bragg', peaks, ...fit, '--rg-nm', String(RG_NM), '--rg-nm-sd', '0.06', '--json', '--quiet']);
    expect(right.code, right.stderr).toBe(0);
    const a = JSON.parse(right.stdout);
    expect(a.rgTie.rgNm).toBe(RG_NM);
    expect(a.intervals['95%'].lo).toBeLessThan(TRUE_CHIN);
    expect(a.intervals['95%'].hi).toBeGreaterThan(TRUE_CHIN);
    expect(right.stderr).toBe('');
    const wrong = await inProcess(['fit-bragg', peaks, ...fit, '--rg-nm', String(RG_NM * 1.05), '--rg-nm-sd', '0.03', '--json', '--quiet']);
    expect(wrong.code, wrong.stderr).toBe(0);
    const b = JSON.parse(wrong.stdout);
    expect(b.chiN).toBeLessThan(a.chiN);
    expect(b.assumptions.join(' ')).toMatch(/D tied to Rg = 6\.3 nm ± 0\.03 nm/);
  });

  it('reads a fit-bragg config under the flags; errors name the flag or the config key (exit 2)', async () => {
    const cfg = join(dir, 'fit-bragg.json');
    writeFileSync(cfg, JSON.stringify({ version: 2, kind: 'fit-bragg', system: { chain: { type: 'diblock', f: 0.3 } }, cell: { nx: 24 } }));
    const bad = await inProcess(['fit-bragg', peaks, cfg]);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toMatch(/fit-bragg\.json: cell\.nx: got 24; must be a power of two/);
    const flag = await inProcess(['fit-bragg', peaks, cfg, '--nx', '48']);
    expect(flag.code).toBe(2);
    expect(flag.stderr).toMatch(/--nx → cell\.nx: got 48/);
    const noSd = await inProcess(['fit-bragg', peaks, ...fit, '--rg-nm', '6']);
    expect(noSd.code).toBe(2);
    expect(noSd.stderr).toMatch(/--rg-nm: the period is tied to Rg, but neither D nor Rg has an uncertainty/);
    expect(noSd.stderr).not.toMatch(/\bat .*\.js:\d+/);
  });
});

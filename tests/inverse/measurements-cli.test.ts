import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { readFormat } from '../../src/io/formats/file-format.js';
import { braggPatternFileSchema, braggPeaksCsv } from '../../src/io/formats/bragg-pattern.js';
import { runCli as runInProcess } from '../../src/cli/run-cli.js';
import { runCli } from '../helpers/run-cli.js';
import { pdfText } from '../reports/pdf-tools.js';

const grid = ['--nx', '32', '--ns', '60'];
// Refusals and the lamella solve run the command line in this process (src/cli/run-cli.ts, as
// tests/faults does): a node start-up each cost more than they do. The fits that draw reports
// run the built program.
const inProcess = (args: string[]) => runInProcess(args, { capture: true });
const dir = mkdtempSync(join(tmpdir(), 'mesofield-meas-'));
// Scenario of our own: χN = 15, Rg = 2.8 nm, two periods, 2 % noise, x written in nm.
// synth --out DIR writes DIR/profile.csv (and its truth beside it).
const nm = join(dir, 'nm', 'profile.csv');
// Set-up in this process through the CLI entry function (synth's own process case is tests/inverse/cli.test.ts's).
beforeAll(async () => {
  const made = await inProcess(['synth', '--f', '0.5', '--chiN', '15', ...grid, '--periods', '2', '--points', '40', '--noise', '0.02', '--seed', '3', '--rg-nm', '2.8', '--out', join(dir, 'nm'), '--quiet']);
  expect(made.code, made.stderr).toBe(0);
});

describe('invert: honest about Rg and units', () => {
  // One run serves the text summary and the report (the same fit; --quiet only silences progress).
  const reportOut = join(dir, 'inv-report');
  let a: ReturnType<typeof runCli>;
  beforeAll(() => {
    a = runCli(['invert', nm, '--f', '0.5', ...grid, '--rg-nm', '2.8', '--chiN-range', '12,20', '--out', reportOut, '--report', '--quiet']);
  });

  it('states the Rg sensitivity without an sd, and profiles Rg out with one', async () => {
    expect(a.code, a.stderr).toBe(0);
    expect(a.stdout).toMatch(/SENSITIVITY: .*Rg × 0\.95 gives χN = [\d.]+, Rg × 1\.05 gives [\d.]+.*--period free/);
    expect(a.stdout).toMatch(/period [\d.]+ nm \([\d.]+ Rg\)/);
    const b = await inProcess(['invert', nm, '--f', '0.5', ...grid, '--rg-nm', '2.8', '--rg-nm-sd', '0.14', '--chiN-range', '12,20', '--json', '--quiet']);
    expect(b.code).toBe(0);
    const c = JSON.parse(b.stdout).estimators.classical;
    expect(c.interval[1] - c.interval[0]).toBeGreaterThan(c.assumedInputs.statisticalInterval[1] - c.assumedInputs.statisticalInterval[0]);
    expect(c.interval95[0]).toBeLessThan(15);
    expect(c.interval95[1]).toBeGreaterThan(15);
    expect(c.intervalMethod).toMatch(/exact profile likelihood over Rg/);
  });

  it("the report's first page shows χN with its interval, what it rests on (the Rg sensitivity measured, f and b_A/b_B as exact) and the run time", () => {
    const out = reportOut;
    expect(a.code, a.stderr).toBe(0);
    const page1 = pdfText(join(out, 'report', 'report.pdf'), 1);
    const result = JSON.parse(readFileSync(join(out, 'result.json'), 'utf8'));
    const c = result.estimators.classical;
    expect(page1).toMatch(/fitted χN \(profile-likelihood intervals\)/);
    expect(page1).toContain(`68 %: ${Number(c.interval[0].toPrecision(5))}`);
    expect(page1).toMatch(/What this χN rests on/);
    // The sensitivity on the page is the one the run measured (the refits at Rg × 0.95 and × 1.05).
    expect(page1).toContain(`Rg 5 % smaller gives χN = ${Number(c.assumedInputs.sensitivity.chiNAtMinus.toPrecision(4))}`);
    expect(page1).toMatch(/f = 0\.5 taken as exact/);
    expect(page1).toMatch(/b_A\/b_B = 1 taken as exact/);
    expect(page1).toMatch(/Run time: [\d.]+ s \(the whole inversion/);
    expect(result.runSeconds).toBeGreaterThan(c.seconds);
  });

  it('refuses x in nm read as Rg, and x_nm without an Rg, naming --rg-nm (exit 2)', async () => {
    const r = await inProcess(['invert', nm, '--f', '0.5', ...grid, '--quiet']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/x is read in Rg .*give --rg-nm R/);
    const withUnit = join(dir, 'xnm.csv');
    writeFileSync(withUnit, readFileSync(nm, 'utf8').replace(/^x,/, 'x_nm,'));
    const s = await inProcess(['invert', withUnit, '--f', '0.5', ...grid, '--quiet']);
    expect(s.code).toBe(2);
    expect(s.stderr).toMatch(/x_nm.*--rg-nm/);
    const t = await inProcess(['invert', nm, '--f', '0.5', ...grid, '--rg-nm-sd', '0.1', '--quiet']);
    expect(t.code).toBe(2);
    expect(t.stderr).toMatch(/--rg-nm-sd: got 0\.1, but x is in Rg/);
  });
});

describe('bragg-pattern', () => {
  it('prints the peaks of a solved lamella: even orders vanish at f = 0.5', async () => {
    const out = join(dir, 'sol');
    expect((await inProcess(['solve', '--f', '0.5', '--chiN', '20', '--period', 'equilibrium', ...grid, '--out', out, '--quiet'])).code).toBe(0);
    const r = await inProcess(['bragg-pattern', join(out, 'solution.json'), '--orders', '4', '--json']);
    expect(r.code).toBe(0);
    const res = JSON.parse(r.stdout);
    expect(res.peaks[1].relative).toBeLessThan(1e-10);
    expect(res.peaks[2].relative).toBeGreaterThan(1e-3);
    expect(res.peaks[0].q).toBeCloseTo((2 * Math.PI) / res.period, 10);
    // --json prints the result file's value (io/formats/bragg-pattern.ts).
    expect(braggPatternFileSchema.parse(res).orders).toBe(4);
  });

  it('--out writes result.json, peaks.csv and pattern.csv through their one format, and the report reads them', async () => {
    const out = join(dir, 'pattern');
    const r = runCli(['bragg-pattern', join(dir, 'sol', 'solution.json'), '--orders', '3', '--rg-nm', '2.8', '--out', out, '--report']);
    expect(r.code, r.stderr).toBe(0);
    const res = readFormat(join(out, 'result.json'), braggPatternFileSchema);
    expect(res.qUnit).toBe('nm⁻¹');
    // q_1 = 2π/D with D in nm (Rg = 2.8 nm; geometry, common practice, no source).
    expect(res.peaks[0].q).toBeCloseTo((2 * Math.PI) / (res.period * 2.8), 10);
    expect(res.system.chiN).toBe(20);
    expect(readFileSync(join(out, 'peaks.csv'), 'utf8')).toBe(braggPeaksCsv(res));
    const pattern = readFileSync(join(out, 'pattern.csv'), 'utf8').trim().split('\n');
    expect(pattern[0]).toBe('q,I');
    expect(pattern.length).toBeGreaterThan(100);
    expect(r.stdout).toMatch(/^lamella at χN = 20: period D = [\d.]+ nm/);
    expect(pdfText(join(out, 'report', 'report.pdf'))).toMatch(/Bragg pattern of the lamella at χN = 20/);
    // `report DIR` reads result.json and pattern.csv back through their format and draws the same page.
    const again = await inProcess(['report', out, '--out', join(out, 'again'), '--format', 'pdf', '--quiet']);
    expect(again.code, again.stderr).toBe(0);
    expect(pdfText(join(out, 'again', 'report.pdf'))).toMatch(/Bragg pattern of the lamella at χN = 20/);
  });
});

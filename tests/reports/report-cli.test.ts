/** `mesofield report` end to end through the built CLI: a real solve run, outputs, and bad input (exit 2). */
import { beforeAll, describe, expect, it } from 'vitest';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { runCli as runInProcess } from '../../src/cli/run-cli.js';
import { runCli } from '../helpers/run-cli.js';
import { pdfInfo, pdfText, pngHeader } from './pdf-tools.js';

const root = mkdtempSync(join(tmpdir(), 'mesofield-report-'));
const run = join(root, 'run');

// Set-up in this process through the CLI entry function (solve's own process case is tests/cli/solve-cli.test.ts's).
beforeAll(async () => {
  const r = await runInProcess(['solve', '--chiN', '15', '--nx', '32', '--ns', '40', '--propagators', '--quiet', '--out', run], { capture: true });
  expect(r.code, r.stderr).toBe(0);
});

describe('mesofield report on a solve run', () => {
  it('writes an A4 PDF and one PNG per figure at the asked DPI', async () => {
    const out = join(root, 'rep');
    const r = runCli(['report', run, '--out', out, '--dpi', '100', '--rg-nm', '5']);
    expect(r.code, r.stderr).toBe(0);
    const info = pdfInfo(join(out, 'report.pdf'));
    expect(Number(info.Pages)).toBeLessThanOrEqual(5);
    expect(info['Page size']).toMatch(/^595(\.\d+)? x 841(\.\d+)? pts \(A4\)/);
    const sol = JSON.parse(readFileSync(join(run, 'solution.json'), 'utf8'));
    // The PDF date is the run's own date (provenance.createdAt), to the second.
    expect(info.CreationDate).toBe(`${String(sol.provenance.createdAt).slice(0, 19)}Z`);
    const text = pdfText(join(out, 'report.pdf'));
    // The period in nm first (five significant digits), Rg second.
    expect(text).toContain(`${Number((sol.summary.period * 5).toPrecision(5))} nm (${Number(sol.summary.period.toPrecision(5))} Rg)`);
    expect(readdirSync(join(out, 'figures')).sort()).toEqual(['period-search.png', 'profiles-exchange-field.png', 'profiles-phi.png', 'propagators.png']);
    for (const f of readdirSync(join(out, 'figures'))) {
      const h = pngHeader(readFileSync(join(out, 'figures', f)));
      expect(h.pixelsPerMetre).toBe(Math.round(100 / 0.0254));
    }
    // The default is RUN_DIR/report, and the same run gives the same bytes (the second drawing in
    // this process through the CLI entry function: the same bytes from either way in).
    expect((await runInProcess(['report', run, '--dpi', '100', '--rg-nm', '5', '--quiet'], { capture: true })).code).toBe(0);
    expect(Buffer.compare(readFileSync(join(run, 'report', 'report.pdf')), readFileSync(join(out, 'report.pdf')))).toBe(0);
    expect(Buffer.compare(readFileSync(join(run, 'report', 'figures', 'propagators.png')), readFileSync(join(out, 'figures', 'propagators.png')))).toBe(0);
  });

  it('writes only what --format asks for (in this process through the CLI entry function: no node start-up)', async () => {
    const out = join(root, 'pdf-only');
    expect((await runInProcess(['report', run, '--out', out, '--format', 'pdf', '--quiet'], { capture: true })).code).toBe(0);
    expect(readdirSync(out).filter((f) => !f.startsWith('.'))).toEqual(['report.pdf']);
  });
});

describe('mesofield report on a sweep run', () => {
  it('draws F − F_dis, the period and Q against χN with the spinodal and the order–disorder estimate', async () => {
    const cfg = join(root, 'scan.sweep.json');
    writeFileSync(
      cfg,
      JSON.stringify({ version: 2, kind: 'sweep', system: { chain: { type: 'diblock' } }, parameters: { chiN: { from: 9, to: 21, count: 5 }, f: [0.5], segmentRatio: [1] }, cell: { period: 'equilibrium', periods: 1, nx: 32, ns: 60 }, solver: { tolerance: 1e-8 } }),
    );
    const dir = join(root, 'scan');
    // In this process through the CLI entry function (the built program is run above).
    const s = await runInProcess(['sweep', cfg, '--out', dir, '--quiet'], { capture: true });
    expect(s.code, s.stderr).toBe(0);
    const r = await runInProcess(['report', dir, '--format', 'pdf'], { capture: true });
    expect(r.code, r.stderr).toBe(0);
    const text = pdfText(join(dir, 'report', 'report.pdf'));
    for (const t of ['mesofield sweep report', 'F − F_dis (kT per chain)', 'period D / Rg', 'order–disorder estimate', 'RPA spinodal', 'Q (–)']) expect(text).toContain(t);
    // The symmetric diblock's spinodal (Leibler 1980: 10.495, from memory) on page 1.
    expect(pdfText(join(dir, 'report', 'report.pdf'), 1)).toMatch(/RPA spinodal χN\s+10\.49/);
  });
});

describe('mesofield report: bad input exits 2 with a message naming the problem', () => {
  // One case through the built program (the exit code and stderr a user sees); the others run the
  // same command code in this process through the CLI's entry function (no node start-up each).
  const inProcess = (args: string[]) => runInProcess(args, { capture: true });

  it('missing run directory', () => {
    const r = runCli(['report', join(root, 'nope')]);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain(`${join(root, 'nope')}: run directory not found`);
  });

  it('directory without a solution file', async () => {
    const empty = join(root, 'empty');
    mkdirSync(empty);
    writeFileSync(join(empty, 'notes.txt'), 'x');
    const r = await inProcess(['report', empty]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/no solution file found.*files here: notes\.txt/);
  });

  it('inconsistent solution file (propagators of the wrong shape), leaving an existing report untouched', async () => {
    const bad = join(root, 'bad');
    mkdirSync(bad);
    const sol = JSON.parse(readFileSync(join(run, 'solution.json'), 'utf8'));
    sol.propagators.q.pop();
    writeFileSync(join(bad, 'solution.json'), JSON.stringify(sol));
    const out = join(root, 'keep');
    mkdirSync(out);
    writeFileSync(join(out, 'report.pdf'), 'previous report');
    const r = await inProcess(['report', bad, '--out', out]);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain(`${join(bad, 'solution.json')}: propagators.q: got 40 values; must hold summary.ns + 1 = 41 rows`);
    expect(readFileSync(join(out, 'report.pdf'), 'utf8')).toBe('previous report');
  });

  it('grid arrays that disagree with summary.nx', async () => {
    const bad = join(root, 'bad-grid');
    mkdirSync(bad);
    const sol = JSON.parse(readFileSync(join(run, 'solution.json'), 'utf8'));
    sol.grid.phiA = sol.grid.phiA.slice(1);
    writeFileSync(join(bad, 'solution.json'), JSON.stringify(sol));
    const r = await inProcess(['report', bad]);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('grid.phiA');
    expect(existsSync(join(bad, 'report'))).toBe(false);
  });

  it('network and reference on different grids', async () => {
    const mixed = join(root, 'mixed');
    mkdirSync(mixed);
    const ref = JSON.parse(readFileSync(join(run, 'solution.json'), 'utf8'));
    writeFileSync(join(mixed, 'solution.json'), JSON.stringify(ref));
    const net = structuredClone(ref);
    net.summary.solver = 'network';
    net.summary.length = ref.summary.length * 1.1;
    net.cell.length = net.summary.length;
    writeFileSync(join(mixed, 'network-solution.json'), JSON.stringify(net));
    const r = await inProcess(['report', mixed]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/network-solution\.json against .*solution\.json: the network solution and the reference differ \(cell length [\d.]+ Rg against [\d.]+ Rg\)/);
  });

  it('bad --format and --dpi', async () => {
    const f = await inProcess(['report', run, '--format', 'pdf,svg']);
    expect(f.code).toBe(2);
    expect(f.stderr).toContain('--format: got "pdf,svg"; allowed: a comma-separated list of pdf, png');
    const d = await inProcess(['report', run, '--dpi', '10']);
    expect(d.code).toBe(2);
    expect(d.stderr).toContain('--dpi: got 10; allowed: a whole number from 36 to 1200');
  });
});

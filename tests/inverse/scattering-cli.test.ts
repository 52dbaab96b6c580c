import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { readFormat } from '../../src/io/formats/file-format.js';
import { scatteringFitCsv, scatteringResultSchema } from '../../src/io/formats/scattering-fit.js';
import { pdfText } from '../reports/pdf-tools.js';
import { scatteringCsv, syntheticScattering } from '../helpers/debye-scattering.js';
import { runCli as runInProcess } from '../../src/cli/run-cli.js';
import { runCli } from '../helpers/run-cli.js';

// Scenario of our own: χN(T) = 4000 K/T − 3 for a symmetric diblock, Rg = 6 nm, 2 % noise on I.
const dir = mkdtempSync(join(tmpdir(), 'mesofield-saxs-'));
const temps = [400, 420, 440, 460, 480];
const files = temps.map((T, i) => {
  const path = join(dir, `T${T}.csv`);
  writeFileSync(path, scatteringCsv(syntheticScattering({ f: 0.5, chiN: 4000 / T - 3, rg: 6, K: 50, bg: 0.3, noise: 0.02, seed: 11 + i })));
  return path;
});

describe('fit-scattering from the command line', () => {
  it('fits a temperature series, prints χ(T) and the transition, and writes result.json that its schema reads', async () => {
    const out = join(dir, 'run');
    const r = runCli(['fit-scattering', ...files, '--f', '0.5', '--temperatures', temps.join(','), '--segments', '200', '--nbar', '1000', '--out', out, '--quiet']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/χN\(T\) = a\/T \+ b: {2}a = /);
    expect(r.stdout).toMatch(/Fredrickson–Helfand/);
    expect(r.stdout).toMatch(/effective χ/);
    const res = readFormat(join(out, 'result.json'), scatteringResultSchema);
    expect(res.fits).toHaveLength(5);
    const [lo, hi] = res.series!.chiNLine.intervals.a['95%'];
    expect(lo).toBeLessThan(4000);
    expect(hi).toBeGreaterThan(4000);
    expect(readFileSync(join(out, 'fit-1.csv'), 'utf8').split('\n')[0]).toBe('q_per_nm,I,dI,model,residual,normalised_residual');
    // Each fit-<k>.csv is written from its entry of result.json (one writer, io/formats/scattering-fit.ts).
    expect(readFileSync(join(out, 'fit-3.csv'), 'utf8')).toBe(scatteringFitCsv(res.fits[2]));
    // `report DIR` reads the result through the same format and draws the scattering pages.
    // In this process through the CLI entry function (the built program runs the fit above).
    const rep = await runInProcess(['report', out, '--format', 'pdf', '--quiet'], { capture: true });
    expect(rep.code, rep.stderr).toBe(0);
    const text = pdfText(join(out, 'report', 'report.pdf'));
    expect(text).toMatch(/Scattering fit: /);
    expect(text).toMatch(/fit-scattering/);
  });

  // In this process through the CLI entry function (the fit above is the built program's case).
  it('refuses an ordered sample in the series, naming its temperature and file (exit 2)', async () => {
    const ordered = join(dir, 'T380.csv');
    const rows = ['q_per_nm,I,dI'];
    for (let i = 0; i < 80; i++) {
      const q = 0.04 + (0.96 * i) / 79;
      const I = 0.3 + 500 * Math.exp(-0.5 * ((q - 0.32) / 0.004) ** 2);
      rows.push(`${q},${I},${0.02 * I}`);
    }
    writeFileSync(ordered, `${rows.join('\n')}\n`);
    const r = await runInProcess(['fit-scattering', ...files, ordered, '--f', '0.5', '--temperatures', [...temps, 380].join(','), '--quiet'], { capture: true });
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/at T = 380 K: .*T380\.csv: the best fit runs to the RPA spinodal/);
    expect(r.stderr).not.toMatch(/at .*\.js:\d+/);
  });

  it('names the flag for bad input', async () => {
    // Refusals before any fit: the command line in this process (src/cli/run-cli.ts, as tests/faults does).
    const inProcess = (args: string[]) => runInProcess(args, { capture: true });
    const r = await inProcess(['fit-scattering', files[0], '--f', '0.5', '--temperatures', '400,410']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/--temperatures: got 2 temperature\(s\) for 1 file/);
    const s = await inProcess(['fit-scattering', files[0], '--f', '0.5', '--rg-nm-sd', '0.3']);
    expect(s.code).toBe(2);
    expect(s.stderr).toMatch(/--rg-nm-sd\) = 0.3 needs an Rg/);
  });
});

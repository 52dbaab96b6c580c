/**
 * One length unit for films from the command line: `synth --film` takes its lengths in the
 * units of the data it writes (nm with --rg-nm, else Rg), the units `invert --film` reads.
 * The check is exact scaling: the same film described in Rg and in nm (Rg = 5 nm) gives the same
 * φA at positions that differ by the factor 5, and the thickness the truth records is the same.
 */
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli } from '../../src/cli/run-cli.js';

// The command lines run in this process through the CLI entry function (no node start-up each):
// what is checked is the units, not the process (synth and invert have their process cases in
// tests/inverse/cli.test.ts).
const run = (args: string[]) => runCli(args, { capture: true });

const rows = (file: string) => readFileSync(file, 'utf8').trim().split('\n').filter((l) => !l.startsWith('#')).slice(1).map((l) => l.split(',').map(Number));

describe('film length units', () => {
  it('synth --film in nm with --rg-nm is the same film as in Rg without it, and invert --film reads it in nm', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'mesofield-film-units-'));
    const common = ['--f', '0.5', '--chiN', '15', '--affinity', '1,-0.5', '--measure', 'phi', '--points', '24', '--noise', '0.01', '--nx', '32', '--ns', '40', '--quiet'];
    let r = await run(['synth', '--film', '6', '--offset', '0.4', '--resolution', '0.2', ...common, '--out', join(dir, 'rg')]);
    expect(r.code, r.stderr).toBe(0);
    r = await run(['synth', '--film', '30', '--offset', '2', '--resolution', '1', '--rg-nm', '5', ...common, '--out', join(dir, 'nm')]);
    expect(r.code, r.stderr).toBe(0);
    const a = rows(join(dir, 'rg', 'profile.csv'));
    const b = rows(join(dir, 'nm', 'profile.csv'));
    expect(b.length).toBe(a.length);
    for (let i = 0; i < a.length; i++) {
      expect(b[i][0]).toBeCloseTo(5 * a[i][0], 9);
      expect(b[i][1]).toBeCloseTo(a[i][1], 12);
    }
    const ta = JSON.parse(readFileSync(join(dir, 'rg', 'truth.json'), 'utf8'));
    const tb = JSON.parse(readFileSync(join(dir, 'nm', 'truth.json'), 'utf8'));
    expect(tb.thickness).toBeCloseTo(ta.thickness, 12);
    expect(tb.thicknessNm).toBeCloseTo(30, 12);
    // A thickness the data cannot hold is refused in the data's units.
    r = await run(['invert', join(dir, 'nm', 'profile.csv'), '--f', '0.5', '--film', '10', '--rg-nm', '5']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/--film: the film is 2 Rg \(10 nm\) thick, but the φA data span/);
    expect(r.stderr).not.toMatch(/\n\s+at /);
  }, 60_000);
});

/** The film measurement commands from the command line: bad input, and one small R(Q) run. */
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli as runInProcess } from '../../src/cli/run-cli.js';
import { runCli } from '../helpers/run-cli.js';

// The refusals run the command line in this process (src/cli/run-cli.ts, as tests/faults does):
// a node start-up each cost more than they do. The R(Q) run uses the built program.
const inProcess = (args: string[]) => runInProcess(args, { capture: true });
const tmp = () => mkdtempSync(join(tmpdir(), 'mesofield-film-'));

describe('film measurement commands', () => {
  it('refuses bad input with exit 2, naming the flag or the file', async () => {
    const dir = tmp();
    let r = await inProcess(['reflectivity', '--f', '0.5', '--chiN', '15', '--film', '20', '--sld', '6,1,2.07']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/--rg-nm: missing/);
    r = await inProcess(['reflectivity', '--f', '0.5', '--chiN', '15', '--film', '20', '--rg-nm', '5', '--sld', '6,1,2.07']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/--sld: got "6,1,2.07"; allowed: 4 comma-separated numbers/);
    const bad = join(dir, 'bad.csv');
    writeFileSync(bad, 'Q,R,dR\n0.01,1,0.1\n0.02,0.5,x\n');
    r = await inProcess(['reflectivity', bad, '--f', '0.5', '--film', '20', '--rg-nm', '5', '--sld', '6,1,2.07,0']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/bad\.csv: line 3, column 3 \(dR\): got "x"/);
    const prof = join(dir, 'prof.csv');
    writeFileSync(prof, `x,phiA\n${Array.from({ length: 12 }, (_, i) => `${i},0.5`).join('\n')}\n`);
    r = await inProcess(['invert', prof, '--f', '0.5', '--film', '5']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/--film: the film is 5 Rg thick, but the φA data span 11 Rg/);
    r = await inProcess(['synth', '--film', '20', '--f', '0.5', '--chiN', '15', '--measure', 'reflectivity', '--rg-nm', '5', '--sld', '6,1,2.07,0']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/--noise: got 0/);
    expect(r.stderr).not.toMatch(/\n\s+at /);
  });

  it('writes R(Q) of a film with total reflection below the substrate edge', () => {
    // Below Q_c = 4 sqrt(π Δρ) of the substrate (silicon, 2.07e-6 Å⁻²: 0.0102 Å⁻¹; from memory)
    // a film of lower SLD than the substrate reflects totally (R = 1 up to the Q smearing).
    const out = join(tmp(), 'curve');
    const r = runCli(['reflectivity', '--f', '0.5', '--chiN', '15', '--film', '20', '--affinity', '1,1', '--rg-nm', '5', '--sld', '1.5,1.0,2.07,0', '--dq-over-q', '0', '--q-range', '0.004,0.1', '--points', '60', '--nx', '16', '--ns', '40', '--out', out]);
    expect(r.code, r.stderr).toBe(0);
    const rows = readFileSync(join(out, 'reflectivity.csv'), 'utf8').trim().split('\n').slice(1).map((l) => l.split(',').map(Number));
    expect(rows.length).toBe(60);
    const qc = 4 * Math.sqrt(Math.PI * 2.07e-6);
    for (const [q, R] of rows) {
      expect(R).toBeLessThanOrEqual(1 + 1e-12);
      if (q < 0.97 * qc) expect(R).toBeCloseTo(1, 8);
      if (q > 2 * qc) expect(R).toBeLessThan(0.05);
    }
    const result = JSON.parse(readFileSync(join(out, 'result.json'), 'utf8'));
    expect(result.kind).toBe('film-reflectivity');
    expect(result.converged).toBe(true);
    // The film solve's progress on stderr (src/cli/film-solve-progress.ts; its time left is checked in film-solve-progress.test.ts).
    expect(r.stderr).toMatch(/reflectivity: film solve: start 1\/\d \(the disordered film: field iterations at χN = [\d.]+\), step \d+ \| residual [\d.]+e[+-]\d+ kT \(tolerance 1e-9\)/);
  });
});

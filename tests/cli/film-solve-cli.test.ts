// `solve --film H --affinity B,T`: the film keys scripts rely on, checked against an
// independent computation: a reflecting wall is a mirror plane (method of images, common
// practice, no source), so a film of neutral walls and thickness H = L holding one lamellar
// period between two A-domain centres has the free energy per chain of the periodic lamella
// of period L (Matsen, J. Chem. Phys. 106, 7781 (1997) uses the same construction).
import { describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { runCli as runInProcess } from '../../src/cli/run-cli.js';
import { runCli } from '../helpers/run-cli.js';

describe('solve --film', () => {
  it('prints the film keys; neutral walls reproduce the periodic lamella of the same period', async () => {
    const film = runCli(['solve', '--film', '3.7', '--affinity', '0,0', '--chiN', '15', '--nx', '64', '--ns', '100', '--json', '--quiet'], { timeoutMs: 120_000 });
    expect(film.code).toBe(0);
    const f = JSON.parse(film.stdout);
    for (const k of ['thickness', 'freeEnergy', 'freeEnergyPerArea', 'freeEnergyDisordered', 'phase', 'layers', 'iterations', 'residual']) expect(f).toHaveProperty(k);
    expect(f.thickness).toBe(3.7);
    expect(f.freeEnergyPerArea).toBeCloseTo(f.freeEnergy * 3.7, 10);
    // The periodic reference in this process through the CLI entry function (no node start-up).
    const bulk = await runInProcess(['solve', '--period', '3.7', '--chiN', '15', '--nx', '64', '--ns', '100', '--json', '--quiet'], { capture: true });
    expect(bulk.code).toBe(0);
    const b = JSON.parse(bulk.stdout);
    expect(b.phase).toBe('lamellar');
    // Same contour; the film's cell-centred grid and the periodic grid differ: both are spectrally accurate.
    expect(Math.abs(f.freeEnergy - b.freeEnergy)).toBeLessThan(1e-7);
    expect(f.layers.A + f.layers.B).toBeGreaterThanOrEqual(2);
  });

  it('--thickness-scan: F(H) with both walls preferring A has its first minimum near one period (commensurability, Matsen 1997), written for the report', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'mesofield-film-'));
    // In this process through the CLI entry function (the film solve above is the built program's case).
    const r = await runInProcess(['solve', '--film', '3.5', '--affinity', '1,1', '--chiN', '15', '--nx', '32', '--ns', '60', '--thickness-scan', '3:4.5:4', '--json', '--quiet', '--out', join(dir, 'film')], { capture: true });
    expect(r.code, r.stderr).toBe(0);
    const scan = JSON.parse(r.stdout).thicknessScan;
    expect(scan.points).toHaveLength(4);
    const D = 3.7137; // the bulk equilibrium period at χN = 15 (tests/spectral/period.test.ts)
    expect(scan.minima.length).toBeGreaterThan(0);
    // The A-rich layers the walls hold are thinner than half a domain: the minimum sits a little below D.
    expect(scan.minima[0].thickness / D).toBeGreaterThan(0.8);
    expect(scan.minima[0].thickness / D).toBeLessThan(1.05);
    const file = JSON.parse(readFileSync(join(dir, 'film', 'solution.json'), 'utf8'));
    expect(file.thicknessScan.minima[0].thickness).toBeCloseTo(scan.minima[0].thickness, 10);
  });

  it('refuses a malformed --affinity naming the flag', async () => {
    const r = await runInProcess(['solve', '--film', '3.7', '--affinity', '1', '--quiet'], { capture: true });
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('--affinity');
  });
});

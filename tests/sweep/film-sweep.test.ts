/**
 * A sweep with film axes (thickness, wall affinities): the grid, each point against a direct
 * film solve, and its F(H) analysis against the commensurability of lamellae between walls.
 */
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { sweepConfigSchema } from '../../src/io/schemas/sweep-config.js';
import { FilmCell } from '../../src/physics/cell/film-cell.js';
import { systemSchema } from '../../src/physics/chain-schema.js';
import { solveFilm } from '../../src/spectral/film-solve.js';
import { filmSweepScans } from '../../src/sweep/film-sweep.js';
import { sweepPoints } from '../../src/sweep/grid.js';
import { runSweep } from '../../src/sweep/run-sweep.js';

const D = 3.71369; // bulk period at χN = 15, f = ½ (Rg): the periodic reference's stress-free period (README, "Training a network").
const walls = (b: number, t: number) => ({ bottom: { affinity: b }, top: { affinity: t }, range: 0.25 });

describe('film sweep', () => {
  it('orders points χN, then the walls, then the thickness innermost; film axes need a film cell', () => {
    const c = sweepConfigSchema.parse({
      version: 2,
      kind: 'sweep',
      parameters: { chiN: [14, 15], thickness: [3, 4], affinityTop: [1, -1] },
      cell: { kind: 'film', thickness: 3.5, walls: walls(1, 1), nx: 32, ns: 40 },
    });
    expect(sweepPoints(c).map((p) => [p.chiN, p.affinityBottom, p.affinityTop, p.thickness])).toEqual([
      [14, 1, 1, 3], [14, 1, 1, 4], [14, 1, -1, 3], [14, 1, -1, 4],
      [15, 1, 1, 3], [15, 1, 1, 4], [15, 1, -1, 3], [15, 1, -1, 4],
    ]);
    const bad = sweepConfigSchema.safeParse({ version: 2, kind: 'sweep', parameters: { chiN: [15], thickness: [3, 4] } });
    expect(bad.success).toBe(false);
    expect(JSON.stringify(bad.error?.issues)).toContain('thickness');
  });

  it('F(H) over a thickness axis: every point is the direct film solve, and with both walls preferring A the minimum sits near one period (Matsen, J. Chem. Phys. 106, 7781 (1997))', async () => {
    const config = sweepConfigSchema.parse({
      version: 2,
      kind: 'sweep',
      parameters: { chiN: [15], thickness: [0.8 * D, 0.9 * D, 1.0 * D, 1.1 * D] },
      cell: { kind: 'film', thickness: 0.95 * D, walls: walls(1, 1), nx: 32, ns: 60 },
    });
    const dir = mkdtempSync(join(tmpdir(), 'mesofield-film-sweep-'));
    const r = await runSweep({ config, outDir: dir, workers: 1 });
    const points = r.table!.points;
    expect(points.map((p) => p.thickness)).toEqual(config.parameters.thickness);
    // Independent route: the film solver called directly at each thickness, F per area = F·H.
    for (const p of points.slice(1, 2)) {
      const direct = solveFilm({ system: systemSchema.parse({ chain: { type: 'diblock', f: 0.5 }, chiN: 15 }), cell: new FilmCell(p.thickness!, 32, walls(1, 1)), contour: 60, options: config.solver });
      expect(p.freeEnergy).toBeCloseTo(direct.solution.freeEnergy, 6);
      expect(p.freeEnergyPerArea).toBeCloseTo(direct.solution.freeEnergy * p.thickness!, 5);
      expect(p.layers).toBe(direct.layers.sequence);
    }
    const [scan] = filmSweepScans(config, points);
    expect(scan.minima.length).toBe(1);
    expect(scan.minima[0].thickness / D).toBeGreaterThan(0.8);
    expect(scan.minima[0].thickness / D).toBeLessThan(1.05);
    // The cell's thickness lies inside the range: the terrace prediction is there.
    expect(scan.terraces?.meanThickness).toBeCloseTo(0.95 * D, 12);
    const header = readFileSync(join(dir, 'sweep.csv'), 'utf8').split('\n')[0];
    expect(header).toContain('thickness,affinityBottom,affinityTop,freeEnergyPerArea,layers');
  }, 120_000);
});

/**
 * A film sweep's F(H): the points that differ only in thickness (same χN, f, b_A/b_B and
 * walls) form one F(H), analysed exactly as `solve --thickness-scan` does
 * (spectral/thickness-scan.ts: minima, lower hull of F per area, terraces for the cell's
 * thickness when it lies inside the range). H in Rg, F in kT per chain, F·H in kT ρ₀Rg/N.
 * Each point is solved afresh on the grid its config gives (no neighbour starts): give cell.nx
 * a number for F at different H to compare at one resolution (with "auto" each H gets its own).
 */
import type { SweepConfig } from '../io/schemas/sweep-config.js';
import { analyseThickness } from '../spectral/thickness-scan.js';
import type { TerracePrediction, ThicknessPoint, ThicknessScan } from '../spectral/thickness-scan.js';
import type { SweepPointResult } from './solve-point.js';

export interface FilmSweepScan extends ThicknessScan {
  chiN: number;
  f: number;
  segmentRatio: number;
  affinityBottom: number;
  affinityTop: number;
  terraces?: TerracePrediction;
}

/** The F(H) of every (χN, f, b_A/b_B, walls) of a film sweep with more than one thickness, in point order. */
export function filmSweepScans(config: Pick<SweepConfig, 'cell'>, points: SweepPointResult[]): FilmSweepScan[] {
  const groups = new Map<string, SweepPointResult[]>();
  for (const p of [...points].sort((a, b) => a.index - b.index)) {
    if (p.thickness === undefined) continue;
    const key = JSON.stringify([p.chiN, p.f, p.segmentRatio, p.affinityBottom, p.affinityTop]);
    const g = groups.get(key) ?? [];
    g.push(p);
    groups.set(key, g);
  }
  const mean = config.cell.kind === 'film' ? config.cell.thickness : undefined;
  const out: FilmSweepScan[] = [];
  for (const g of groups.values()) {
    if (g.length < 2) continue;
    const rows: ThicknessPoint[] = g.map((p) => ({
      thickness: p.thickness!,
      freeEnergy: p.freeEnergy ?? Number.NaN,
      freeEnergyPerArea: p.freeEnergyPerArea ?? Number.NaN,
      freeEnergyDisordered: p.freeEnergyDisordered ?? Number.NaN,
      phase: p.phase,
      layers: p.layers ?? '',
      // A failed point has no F: it takes no part in the minima or the hull.
      converged: p.converged && p.freeEnergy !== null && p.freeEnergyPerArea !== null && p.freeEnergyPerArea !== undefined,
    }));
    const { chiN, f, segmentRatio } = g[0];
    out.push({ chiN, f, segmentRatio, affinityBottom: g[0].affinityBottom!, affinityTop: g[0].affinityTop!, ...analyseThickness(rows, mean) });
  }
  return out;
}

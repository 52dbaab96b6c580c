/**
 * A film sweep's F(H) for the report: the points that differ only in thickness, analysed by the
 * one F(H) analysis (sweep/film-sweep.ts → spectral/thickness-scan.ts: minima of F per chain,
 * lower hull of F per area), and the bulk lamellar period D of each (χN, f, b_A/b_B) for
 * reference, computed here by the spectral stress-free period search (spectral/period-search.ts)
 * on a periodic cell of one period at the sweep's contour steps (32 grid points: D converges
 * to 1e-4 Rg there for χN ≲ 30 on a smooth lamella; common practice, no source).
 * H and D in Rg, F in kT per chain, F·H in kT ρ₀Rg/N.
 */
import type { ShardFile, SweepTable } from '../../io/formats/sweep.js';
import { PeriodicCell } from '../../physics/cell/periodic-cell.js';
import { findEquilibriumPeriod, periodGuess } from '../../spectral/period-search.js';
import { filmSweepScans } from '../../sweep/film-sweep.js';
import { pointSystem } from '../../sweep/grid.js';
import type { FilmSweepInput } from '../report-inputs.js';

const BULK_NX = 32;

/** The film scans of a sweep table, or undefined when the sweep has no thickness axis with two or more values. */
export function readFilmSweep(file: ShardFile | SweepTable): FilmSweepInput | undefined {
  const config = file.config;
  const scans = filmSweepScans(config, file.points);
  if (scans.length === 0) return undefined;
  const ns = typeof config.cell.ns === 'number' ? config.cell.ns : 100;
  const bulk = new Map<string, { period: number; note?: string }>();
  const out: FilmSweepInput['scans'] = scans.map((s) => {
    const key = JSON.stringify([s.chiN, s.f, s.segmentRatio]);
    if (!bulk.has(key)) bulk.set(key, bulkPeriod(pointSystem(config, s), ns));
    const b = bulk.get(key)!;
    return {
      chiN: s.chiN,
      f: s.f,
      segmentRatio: s.segmentRatio,
      walls: { bottom: s.affinityBottom, top: s.affinityTop },
      points: s.points,
      minima: s.minima,
      stable: s.stable,
      ...(s.terraces ? { terraces: s.terraces } : {}),
      bulkPeriod: b.period,
      ...(b.note ? { bulkNote: b.note } : {}),
    };
  });
  return { scans: out, bulkGrid: { nx: BULK_NX, ns } };
}

function bulkPeriod(system: ReturnType<typeof pointSystem>, ns: number): { period: number; note?: string } {
  try {
    const guess = periodGuess(system);
    const r = findEquilibriumPeriod({ system, cell: new PeriodicCell(guess, BULK_NX, 1), contour: ns });
    return Number.isFinite(r.period) ? { period: r.period } : { period: Number.NaN, note: 'the bulk melt is disordered at this χN: no bulk period' };
  } catch (e) {
    return { period: Number.NaN, note: `the bulk period search failed (${(e as Error).message})` };
  }
}

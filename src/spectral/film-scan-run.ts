/**
 * F(H) of a film over a range of thicknesses (lengths in Rg, F in kT per chain, per area in
 * kT ρ₀Rg/N): one grid for the whole scan (the points the thickest film needs, so F at
 * different H compares at one resolution), its minima (the stable thicknesses) and the
 * terrace prediction for a mean thickness (thickness-scan.ts: the common tangent of F per area).
 */
import { buildChain } from '../physics/chain.js';
import type { SystemSpec } from '../physics/chain-schema.js';
import type { WallsDescription } from '../physics/cell/cell.js';
import type { SpectralOptions } from '../io/schemas/spectral-schema.js';
import { defaultContourSteps, defaultFilmPoints } from './resolution.js';
import { analyseThickness, scanThickness } from './thickness-scan.js';
import type { TerracePrediction, ThicknessPoint, ThicknessScan } from './thickness-scan.js';

export interface FilmScanRequest {
  system: SystemSpec;
  walls: WallsDescription;
  from: number;
  to: number;
  points: number;
  nx: number | 'auto';
  ns: number | 'auto';
  /** The film's mean thickness: its terrace prediction (inside [from, to]). */
  meanThickness?: number;
  options?: Partial<SpectralOptions>;
  onPoint?: (p: ThicknessPoint, done: number, total: number) => void;
}

export interface FilmScanResult extends ThicknessScan {
  nx: number;
  ns: number;
  terraces?: TerracePrediction;
  seconds: number;
}

export function runFilmScan(req: FilmScanRequest): FilmScanResult {
  const t0 = performance.now();
  const chain = buildChain(req.system.chain);
  const nx = req.nx === 'auto' ? defaultFilmPoints(chain, req.system.chiN, req.to, req.walls.range) : req.nx;
  const ns = req.ns === 'auto' ? defaultContourSteps(chain, req.system.chiN) : req.ns;
  const thicknesses = Array.from({ length: req.points }, (_, i) => req.from + ((req.to - req.from) * i) / (req.points - 1));
  const scan = scanThickness({ system: req.system, walls: req.walls, thicknesses, nx, ns, options: req.options, onPoint: req.onPoint });
  const { terraces } = analyseThickness(scan.points, req.meanThickness);
  return { ...scan, nx, ns, ...(terraces ? { terraces } : {}), seconds: (performance.now() - t0) / 1000 };
}

/** The scan as text lines: F(H) table, minima, stable thicknesses, terraces. */
export function filmScanText(r: FilmScanResult): string[] {
  return thicknessScanLines(r, `F(H) at ${r.points.length} thicknesses on one grid (${r.nx} points × ${r.ns} contour steps), ${r.seconds.toFixed(1)} s:`);
}

/** F(H) as text under a heading (a scan's or a sweep's): the table, minima, hull and terraces. */
export function thicknessScanLines(r: ThicknessScan & { terraces?: TerracePrediction }, heading: string): string[] {
  const g = (v: number, d = 6) => String(+v.toPrecision(d));
  const lines = [heading, '  H (Rg)    F (kT/chain)    F·H (kT ρ₀Rg/N)   layers'];
  for (const p of r.points) lines.push(`  ${g(p.thickness, 5).padEnd(9)} ${g(p.freeEnergy, 9).padEnd(15)} ${g(p.freeEnergyPerArea, 9).padEnd(17)} ${p.layers || '–'}${p.converged ? '' : ' (NOT CONVERGED)'}`);
  lines.push(r.minima.length ? `minima of F per chain: ${r.minima.map((m) => `H = ${g(m.thickness, 5)} Rg (${m.layers}, F = ${g(m.freeEnergy, 9)})`).join('; ')}` : 'minima of F per chain: none inside the scanned range');
  lines.push(`thicknesses on the lower convex hull of F per area (what a film may split into): ${r.stable.map((h) => g(h, 5)).join(', ')} Rg`);
  if (r.terraces) {
    const t = r.terraces;
    lines.push(
      t.kind === 'uniform'
        ? `a film of mean thickness ${g(t.meanThickness, 5)} Rg stays uniform`
        : `a film of mean thickness ${g(t.meanThickness, 5)} Rg splits into terraces of ${t.thicknesses.map((h) => g(h, 5)).join(' and ')} Rg covering ${t.areaShares.map((s) => `${(100 * s).toFixed(0)} %`).join(' and ')} of the area (gain ${g(t.gain, 4)} kT ρ₀Rg/N per area)`,
    );
  }
  lines.push('note: terraces follow from the common tangent of F per area between scan points; the grid of scan points limits where minima and hull points can sit.');
  return lines;
}

/**
 * Free energy against film thickness: F(H), its minima (the stable thicknesses) and the
 * terraces a film of a given mean thickness breaks into.
 *
 * Units: H in Rg; F in kT per chain; F per area A(H) = F·H in kT ρ₀Rg/N.
 * A film of fixed material per area (mean thickness H̄) may lower its free energy by splitting
 * into regions of thicknesses H₁ < H̄ < H₂ (terraces: islands and holes) with area shares
 * (H₂ − H̄)/(H₂ − H₁) and (H̄ − H₁)/(H₂ − H₁); it does so when the chord of A(H) between H₁ and H₂
 * lies below A(H̄). The film's thicknesses in equilibrium are therefore the points of the lower
 * convex hull of A(H) (the common-tangent construction; e.g. Matsen, J. Chem. Phys. 106, 7781
 * (1997) for lamellar films; common practice, no source for the hull itself). The minima of
 * F per chain are the commensurate thicknesses the layers prefer.
 */
import type { SystemSpec } from '../physics/chain-schema.js';
import type { WallsDescription } from '../physics/cell/cell.js';
import { FilmCell } from '../physics/cell/film-cell.js';
import type { SpeciesArrays } from '../physics/fields.js';
import type { SpectralOptions } from '../io/schemas/spectral-schema.js';
import { solveFilm } from './film-solve.js';

export interface ThicknessPoint {
  thickness: number;
  freeEnergy: number;
  freeEnergyPerArea: number;
  freeEnergyDisordered: number;
  phase: string;
  layers: string;
  converged: boolean;
}

export interface ThicknessScan {
  points: ThicknessPoint[];
  /** Local minima of F per chain (parabola through the three scan points around each), in Rg. */
  minima: { thickness: number; freeEnergy: number; layers: string }[];
  /** Thicknesses on the lower convex hull of F per area: what a film may be made of. */
  stable: number[];
}

export interface ThicknessScanRequest {
  system: SystemSpec;
  walls: WallsDescription;
  thicknesses: number[];
  nx: number;
  ns: number;
  options?: Partial<SpectralOptions>;
  onPoint?: (p: ThicknessPoint, done: number, total: number) => void;
}

export function scanThickness(req: ThicknessScanRequest): ThicknessScan {
  const hs = [...req.thicknesses].sort((a, b) => a - b);
  const points: ThicknessPoint[] = [];
  let last: SpeciesArrays | undefined;
  for (const H of hs) {
    const r = solveFilm({ system: req.system, cell: new FilmCell(H, req.nx, req.walls), contour: req.ns, options: req.options, initial: last });
    const p: ThicknessPoint = {
      thickness: H,
      freeEnergy: r.solution.freeEnergy,
      freeEnergyPerArea: r.freeEnergyPerArea,
      freeEnergyDisordered: r.solution.freeEnergyDisordered,
      phase: r.solution.phase,
      layers: r.layers.sequence,
      converged: r.solution.converged,
    };
    points.push(p);
    // The neighbour's fields (on the same grid, stretched with H) are one more start for the next thickness.
    if (r.solution.converged) last = r.solution.w;
    req.onPoint?.(p, points.length, hs.length);
  }
  return analyseThickness(points);
}

/**
 * F(H) points (any order; solved here or by a sweep with a thickness axis) as a scan: sorted by
 * H, its minima and its lower hull, and the terrace prediction for a mean thickness inside the
 * range when one is given. The one analysis of F(H) (`solve --thickness-scan`, `sweep`).
 */
export function analyseThickness(unsorted: ThicknessPoint[], meanThickness?: number): ThicknessScan & { terraces?: TerracePrediction } {
  const points = [...unsorted].sort((a, b) => a.thickness - b.thickness);
  const scan: ThicknessScan = { points, minima: minimaOf(points), stable: lowerHull(points) };
  const ok = points.filter((p) => p.converged);
  const inside = meanThickness !== undefined && ok.length > 0 && meanThickness >= ok[0].thickness && meanThickness <= ok[ok.length - 1].thickness;
  return inside && scan.stable.length > 0 ? { ...scan, terraces: predictTerraces(scan, meanThickness) } : scan;
}

/** Local minima of F(H) among converged points, refined by the parabola through each minimum and its neighbours. */
export function minimaOf(points: ThicknessPoint[]): ThicknessScan['minima'] {
  const ok = points.filter((p) => p.converged);
  const out: ThicknessScan['minima'] = [];
  for (let i = 1; i < ok.length - 1; i++) {
    const [a, b, c] = [ok[i - 1], ok[i], ok[i + 1]];
    if (!(b.freeEnergy < a.freeEnergy && b.freeEnergy <= c.freeEnergy)) continue;
    const [x0, x1, x2] = [a.thickness, b.thickness, c.thickness];
    const [y0, y1, y2] = [a.freeEnergy, b.freeEnergy, c.freeEnergy];
    const d = (x0 - x1) * (x0 - x2) * (x1 - x2);
    const A = (x2 * (y1 - y0) + x1 * (y0 - y2) + x0 * (y2 - y1)) / d;
    const B = (x2 * x2 * (y0 - y1) + x1 * x1 * (y2 - y0) + x0 * x0 * (y1 - y2)) / d;
    const C = (x1 * x2 * (x1 - x2) * y0 + x2 * x0 * (x2 - x0) * y1 + x0 * x1 * (x0 - x1) * y2) / d;
    const xm = A > 0 ? -B / (2 * A) : x1;
    const inside = xm > x0 && xm < x2;
    out.push({ thickness: inside ? xm : x1, freeEnergy: inside ? A * xm * xm + B * xm + C : y1, layers: b.layers });
  }
  return out;
}

/** Thicknesses on the lower convex hull of F per area (Andrew's monotone chain, lower half). */
export function lowerHull(points: ThicknessPoint[]): number[] {
  const pts = points.filter((p) => p.converged).map((p) => [p.thickness, p.freeEnergyPerArea] as const);
  const hull: (readonly [number, number])[] = [];
  for (const p of pts) {
    while (hull.length >= 2) {
      const [o, a] = [hull[hull.length - 2], hull[hull.length - 1]];
      const cross = (a[0] - o[0]) * (p[1] - o[1]) - (a[1] - o[1]) * (p[0] - o[0]);
      if (cross <= 0) hull.pop();
      else break;
    }
    hull.push(p);
  }
  return hull.map((p) => p[0]);
}

export interface TerracePrediction {
  meanThickness: number;
  /** Uniform at the mean thickness, or terraces of two thicknesses with their area shares. */
  kind: 'uniform' | 'terraces';
  thicknesses: number[];
  areaShares: number[];
  /** Free energy per area gained by splitting (kT ρ₀Rg/N; 0 when uniform). */
  gain: number;
}

/** What a film of mean thickness H̄ (inside the scanned range) does: the hull segment around H̄. */
export function predictTerraces(scan: ThicknessScan, meanThickness: number): TerracePrediction {
  const pts = scan.points.filter((p) => p.converged);
  const at = (H: number) => pts.find((p) => p.thickness === H)!;
  const stable = scan.stable;
  for (let i = 0; i < stable.length - 1; i++) {
    const [h1, h2] = [stable[i], stable[i + 1]];
    if (meanThickness < h1 || meanThickness > h2) continue;
    if (meanThickness === h1 || meanThickness === h2) return { meanThickness, kind: 'uniform', thicknesses: [meanThickness], areaShares: [1], gain: 0 };
    const s1 = (h2 - meanThickness) / (h2 - h1);
    const chord = s1 * at(h1).freeEnergyPerArea + (1 - s1) * at(h2).freeEnergyPerArea;
    // A(H̄) by linear interpolation between the scan points around H̄.
    const k = pts.findIndex((p) => p.thickness >= meanThickness);
    const p1 = pts[Math.max(0, k - 1)];
    const p2 = pts[k];
    const t = p2.thickness === p1.thickness ? 0 : (meanThickness - p1.thickness) / (p2.thickness - p1.thickness);
    const uniformA = p1.freeEnergyPerArea + t * (p2.freeEnergyPerArea - p1.freeEnergyPerArea);
    if (chord >= uniformA) return { meanThickness, kind: 'uniform', thicknesses: [meanThickness], areaShares: [1], gain: 0 };
    return { meanThickness, kind: 'terraces', thicknesses: [h1, h2], areaShares: [s1, 1 - s1], gain: uniformA - chord };
  }
  throw new RangeError(`mean thickness ${meanThickness} Rg is outside the scanned range [${pts[0]?.thickness}, ${pts[pts.length - 1]?.thickness}] Rg`);
}

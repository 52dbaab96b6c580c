/**
 * Where to add reference solves after a first fit: adaptive sampling by the network's own
 * SCFT residual. Seeded uniform candidate points in the box are solved in the network's fields
 * (one single-chain solve each, as a query); the residual max |d|/χN of the SCFT update
 * (physics/scft-equations.ts, the same d the physics rounds use; divided by χN because the
 * network's output, and its fit, is w/χN) ranks them, and the largest are kept, greedily,
 * no two closer than half an anchor cell on every axis (so one badly fitted corner does not
 * take every solve). The residual needs no reference solution, so the choice never looks at
 * the held-out points or their errors: those stay an independent check.
 * Units: χN and f as in docs/physics.md; residuals dimensionless (w/χN).
 */
import { fieldDeviation } from '../physics/scft-equations.js';
import { Xorshift128 } from '../numerics/random.js';
import type { ParameterPoint, ParameterSpace } from './parameter-space.js';
import type { SurrogateModel } from './surrogate-model.js';

export interface RankedPoint {
  point: ParameterPoint;
  /** max |d| / χN of the network's fields at the point. */
  residual: number;
}

/** The candidates' residuals in the network's current fields, largest first. */
export function rankByResidual(space: ParameterSpace, model: SurrogateModel, candidates: ParameterPoint[]): RankedPoint[] {
  const sols = model.solutions(candidates);
  return candidates
    .map((p, k) => ({ point: p, residual: fieldDeviation(space.chain(p), p.chiN, sols[k].w, sols[k].phi).residual / p.chiN }))
    .sort((a, b) => b.residual - a.residual);
}

/**
 * Up to `count` of the ranked points, largest residual first, skipping any within half an
 * anchor cell (per axis, in normalised units) of one already kept.
 */
export function spreadOut(space: ParameterSpace, ranked: RankedPoint[], count: number): RankedPoint[] {
  const halfCell = space.axes.map((a) => 1 / (a.anchors - 1));
  const kept: RankedPoint[] = [];
  const near = (p: number[], q: number[]) => p.every((v, d) => Math.abs(v - q[d]) < halfCell[d]);
  for (const r of ranked) {
    if (kept.length >= count) break;
    const u = space.normalised(r.point);
    if (kept.some((k) => near(u, space.normalised(k.point)))) continue;
    kept.push(r);
  }
  return kept;
}

/** `count` points where the network's residual is largest, from `candidates` seeded uniform draws. */
export function adaptivePoints(space: ParameterSpace, model: SurrogateModel, count: number, candidates: number, seed: number): RankedPoint[] {
  const rng = new Xorshift128(seed);
  const draws = Array.from({ length: candidates }, () => space.draw(rng));
  return spreadOut(space, rankByResidual(space, model, draws), count);
}

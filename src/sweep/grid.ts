/**
 * The points of a sweep grid and the system each one solves. Points are ordered f
 * outermost, then b_A/b_B, then χN, then (a film sweep) the bottom and top walls' affinities,
 * then the thickness innermost (a run of points is one F(H)); a point's index is its place in that order, and
 * shards, saved files and merges all name points by it. χN and f as in docs/physics.md;
 * a ratio r = b_A/b_B gives the chain segment lengths { A: r, B: 1 } (b_B = b of Rg).
 */
import { InputError } from '../io/errors.js';
import type { SolveConfig } from '../io/schemas/solve-config.js';
import type { SweepConfig } from '../io/schemas/sweep-config.js';
import { systemSchema } from '../physics/chain-schema.js';
import type { SystemSpec } from '../physics/chain-schema.js';

export interface SweepPoint {
  index: number;
  chiN: number;
  f: number;
  /** b_A/b_B. */
  segmentRatio: number;
  /** A film sweep only: the film's thickness H (Rg) and its walls' affinities for A. */
  thickness?: number;
  affinityBottom?: number;
  affinityTop?: number;
}

type Axis = SweepConfig['parameters']['chiN'];

export function axisValues(a: Axis): number[] {
  if (Array.isArray(a)) return a.slice();
  if (a.count === 1) return [a.from];
  // The end value is `to` itself, not from + (count − 1)·step with its rounding error.
  return Array.from({ length: a.count }, (_, i) => (i === a.count - 1 ? a.to : a.from + ((a.to - a.from) * i) / (a.count - 1)));
}

/** The film axes of a sweep (each defaulting to the cell's own value), or null for a periodic sweep. */
export function filmAxes(config: Pick<SweepConfig, 'parameters' | 'cell'>): { thickness: number[]; affinityBottom: number[]; affinityTop: number[] } | null {
  const c = config.cell;
  if (c.kind !== 'film') return null;
  const p = config.parameters;
  return {
    thickness: p.thickness ? axisValues(p.thickness) : [c.thickness!],
    affinityBottom: p.affinityBottom ? axisValues(p.affinityBottom) : [c.walls?.bottom.affinity ?? 0],
    affinityTop: p.affinityTop ? axisValues(p.affinityTop) : [c.walls?.top.affinity ?? 0],
  };
}

export function sweepPoints(config: SweepConfig): SweepPoint[] {
  const points: SweepPoint[] = [];
  const film = filmAxes(config);
  for (const f of axisValues(config.parameters.f))
    for (const segmentRatio of axisValues(config.parameters.segmentRatio))
      for (const chiN of axisValues(config.parameters.chiN)) {
        if (!film) {
          points.push({ index: points.length, chiN, f, segmentRatio });
          continue;
        }
        for (const affinityBottom of film.affinityBottom)
          for (const affinityTop of film.affinityTop)
            for (const thickness of film.thickness) points.push({ index: points.length, chiN, f, segmentRatio, thickness, affinityBottom, affinityTop });
      }
  return points;
}

export function pointSystem(config: Pick<SweepConfig, 'system'>, p: Pick<SweepPoint, 'chiN' | 'f' | 'segmentRatio'>): SystemSpec {
  const shape = config.system.chain;
  const chain =
    shape.type === 'triblock'
      ? { type: 'triblock' as const, f: p.f, firstBlockShare: shape.firstBlockShare, segmentRatio: p.segmentRatio }
      : { type: 'diblock' as const, f: p.f, segmentRatio: p.segmentRatio };
  return systemSchema.parse({ chain, chiN: p.chiN });
}

/** The solve config of one point: the library's reference solve does the rest. */
export function pointSolveConfig(config: SweepConfig, p: SweepPoint): Pick<SolveConfig, 'system' | 'cell' | 'solver' | 'output'> {
  const c = config.cell;
  const cell =
    c.kind === 'film' && p.thickness !== undefined
      ? { ...c, thickness: p.thickness, walls: { ...c.walls!, bottom: { affinity: p.affinityBottom! }, top: { affinity: p.affinityTop! } } }
      : c;
  return { system: pointSystem(config, p), cell, solver: config.solver, output: { propagators: false } };
}

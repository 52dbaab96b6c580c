/**
 * Config file kind "sweep": a grid of (χN, f, b_A/b_B) points, one reference solve each.
 *
 * Lengths are in Rg of a chain whose segments all have the reference length b = b_B
 * (docs/physics.md): the ratio r of a point is the chain's `segmentRatio`, exactly as in a
 * solve config.
 */
import { z } from 'zod';
import { configVersionSchema } from './config-version.js';
import { cellSchema, spectralSchema } from './spectral-schema.js';

const chiN = z.number().min(0).max(500);
const fraction = z.number().gt(0, 'must be > 0').lt(1, 'must be < 1');
const ratio = z.number().gt(0).lte(10);
/** A film's thickness (Rg) and a wall's affinity for A (kT per chain × Rg), as in the cell block. */
const thickness = z.number().gt(0).max(1000);
const affinity = z.number().min(-100).max(100);

export const MAX_POINTS = 100000;

/**
 * The `system` block of a config over a parameter range (sweep, surrogate): the chain's
 * architecture only; `parameters` fill system.chiN, system.chain.f and system.chain.segmentRatio.
 */
export const rangeSystemSchema = z
  .object({
    chain: z
      .object({
        type: z.enum(['diblock', 'triblock']).default('diblock'),
        /** Triblock only: share of the A material in the first A block (0.5: symmetric ABA). */
        firstBlockShare: z.number().gt(0).lt(1).default(0.5),
      })
      .strict()
      .prefault({}),
  })
  .strict()
  .prefault({});

/** Number of values on one axis of the parameters. */
export function axisLength(a: number[] | { count: number }): number {
  return Array.isArray(a) ? a.length : a.count;
}

/** Points of the film axes together (1 when a sweep has none). */
function filmAxesLength(g: { thickness?: number[] | { count: number }; affinityBottom?: number[] | { count: number }; affinityTop?: number[] | { count: number } }): number {
  return [g.thickness, g.affinityBottom, g.affinityTop].reduce((n, a) => n * (a ? axisLength(a) : 1), 1);
}

/** A list of values, or evenly spaced values from `from` to `to` inclusive. */
function axis(value: z.ZodNumber) {
  return z.union([
    z.array(value).min(1).max(10000),
    z
      .object({ from: value, to: value, count: z.number().int().min(1).max(10000) })
      .strict()
      .refine((r) => r.count > 1 || r.from === r.to, { message: 'count 1 needs from = to (one value)' })
      .meta({ constraint: 'count 1 needs from = to' }),
  ]);
}

export const sweepConfigSchema = z
  .object({
    version: configVersionSchema,
    kind: z.literal('sweep'),
    /** The chain architecture; chiN, its A fraction and b_A/b_B come from `parameters`. */
    system: rangeSystemSchema,
    parameters: z
      .object({
        chiN: axis(chiN),
        /** A fractions of the chain. */
        f: axis(fraction).default([0.5]),
        /** Conformational asymmetry b_A/b_B (b_B is the reference length b of Rg). */
        segmentRatio: axis(ratio).default([1]),
        /** Film thicknesses H (Rg); a film sweep only (cell.kind "film"; default: cell.thickness). */
        thickness: axis(thickness).optional(),
        /** Affinities of the bottom and top walls for A; a film sweep only (default: cell.walls). */
        affinityBottom: axis(affinity).optional(),
        affinityTop: axis(affinity).optional(),
      })
      .strict()
      .refine((g) => axisLength(g.chiN) * axisLength(g.f) * axisLength(g.segmentRatio) * filmAxesLength(g) <= MAX_POINTS, {
        message: `at most ${MAX_POINTS} points (the product of the axis lengths): split the sweep into several configs`,
      })
      .meta({ constraint: `at most ${MAX_POINTS} points (the product of the axis lengths)` }),
    cell: cellSchema.prefault({}),
    /**
     * Spectral solver settings of every point. Each point starts afresh from this start
     * (never from a neighbour's solution), so a point's result does not depend on which
     * shard or worker solved it.
     */
    solver: spectralSchema
      .prefault({})
      .refine((s) => s.start.type !== 'file', { message: 'start "file" is not allowed in a sweep (one file cannot fit every point): use "cosine" or "rpa"', path: ['start', 'type'] })
      .meta({ constraint: 'start.type "cosine" or "rpa" (not "file")' }),
  })
  .strict()
  .superRefine((c, ctx) => {
    if (c.cell.kind === 'film') return;
    for (const k of ['thickness', 'affinityBottom', 'affinityTop'] as const) {
      if (c.parameters[k] !== undefined) ctx.addIssue({ code: 'custom', path: ['parameters', k], message: 'a film axis: it needs cell.kind "film" (with cell.thickness)' });
    }
  })
  .meta({ constraint: 'parameters.thickness, affinityBottom and affinityTop need cell.kind "film"' });

export type SweepConfig = z.infer<typeof sweepConfigSchema>;
export type SweepConfigInput = z.input<typeof sweepConfigSchema>;

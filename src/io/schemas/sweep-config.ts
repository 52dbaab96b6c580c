/**
 * Config file kind "sweep": a grid of (χN, f, b_A/b_B) points, one reference solve each.
 *
 * Lengths are in Rg of a chain whose segments all have the reference length b = b_B
 * (SCFT-NOTES.md): the ratio r of a point sets the chain's segment lengths to
 * { A: r, B: 1 }, exactly as a solve config with `segmentLengths` would.
 */
import { z } from 'zod';
import { cellSchema, spectralSchema } from './spectral-schema.js';

const chiN = z.number().min(0).max(500);
const fraction = z.number().gt(0, 'must be > 0').lt(1, 'must be < 1');
const ratio = z.number().gt(0).lte(10);

export const MAX_POINTS = 100000;

/** Number of values on one axis of the grid. */
export function axisLength(a: number[] | { count: number }): number {
  return Array.isArray(a) ? a.length : a.count;
}

/** A list of values, or evenly spaced values from `from` to `to` inclusive. */
function axis(value: z.ZodNumber) {
  return z.union([
    z.array(value).min(1).max(10000),
    z
      .object({ from: value, to: value, count: z.number().int().min(1).max(10000) })
      .strict()
      .refine((r) => r.count > 1 || r.from === r.to, { message: 'count 1 needs from = to (one value)' }),
  ]);
}

export const sweepConfigSchema = z
  .object({
    version: z.literal(1),
    kind: z.literal('sweep'),
    /** The chain architecture; its A fraction and segment lengths come from the grid. */
    chain: z
      .object({
        type: z.enum(['diblock', 'triblock']).default('diblock'),
        /** Triblock only: share of the A material in the first A block (0.5: symmetric ABA). */
        firstBlockShare: z.number().gt(0).lt(1).default(0.5),
      })
      .strict()
      .prefault({}),
    grid: z
      .object({
        chiN: axis(chiN),
        /** A fractions of the chain. */
        f: axis(fraction).default([0.5]),
        /** Conformational asymmetry b_A/b_B (b_B is the reference length b of Rg). */
        segmentLengthRatio: axis(ratio).default([1]),
      })
      .strict()
      .refine((g) => axisLength(g.chiN) * axisLength(g.f) * axisLength(g.segmentLengthRatio) <= MAX_POINTS, {
        message: `at most ${MAX_POINTS} points (the product of the axis lengths): split the sweep into several configs`,
      }),
    cell: cellSchema.prefault({}),
    /**
     * Spectral solver settings of every point. Each point starts afresh from this start
     * (never from a neighbour's solution), so a point's result does not depend on which
     * shard or worker solved it.
     */
    reference: spectralSchema
      .prefault({})
      .refine((s) => s.start.type !== 'file', { message: 'start "file" is not allowed in a sweep (one file cannot fit every point): use "cosine" or "rpa"', path: ['start', 'type'] }),
  })
  .strict();

export type SweepConfig = z.infer<typeof sweepConfigSchema>;
export type SweepConfigInput = z.input<typeof sweepConfigSchema>;

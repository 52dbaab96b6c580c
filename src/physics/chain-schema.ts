/**
 * The zod schema of a chain and a system, shared by every config file kind.
 * Types are inferred from it; the resolved model lives in chain.ts.
 */
import { z } from 'zod';
import { FIRST_BLOCK_SHARE_BOUND, FIRST_BLOCK_SHARE_DEFAULT, FRACTION_BOUND, SEGMENT_RATIO_BOUND, SEGMENT_RATIO_DEFAULT } from './chain-bounds.js';

export const speciesSchema = z.enum(['A', 'B']);

const fraction = z.number().gt(FRACTION_BOUND.above, `must be > ${FRACTION_BOUND.above}`).lt(FRACTION_BOUND.below, `must be < ${FRACTION_BOUND.below}`);
const segmentLength = z.number().gt(SEGMENT_RATIO_BOUND.above).lte(SEGMENT_RATIO_BOUND.atMost).default(SEGMENT_RATIO_DEFAULT);

export const blockSchema = z
  .object({
    species: speciesSchema,
    fraction: z.number().gt(0).lte(1),
    segmentLength,
  })
  .strict();

/**
 * Conformational asymmetry b_A/b_B. Lengths are in Rg of a chain whose segments all have the
 * reference length b = b_B, so the blocks get segment lengths { A: r, B: 1 }.
 */
const segmentRatioSchema = z.number().gt(SEGMENT_RATIO_BOUND.above).lte(SEGMENT_RATIO_BOUND.atMost).default(SEGMENT_RATIO_DEFAULT);

export const chainSchema = z.discriminatedUnion('type', [
  z
    .object({
      type: z.literal('diblock'),
      /** A volume (length) fraction of the chain. */
      f: fraction,
      segmentRatio: segmentRatioSchema,
    })
    .strict(),
  z
    .object({
      type: z.literal('triblock'),
      /** Total A fraction, split over the two end blocks. */
      f: fraction,
      /** Share of the A material in the first A block; 0.5 is the symmetric ABA. */
      firstBlockShare: z.number().gt(FIRST_BLOCK_SHARE_BOUND.above).lt(FIRST_BLOCK_SHARE_BOUND.below).default(FIRST_BLOCK_SHARE_DEFAULT),
      segmentRatio: segmentRatioSchema,
    })
    .strict(),
  z
    .object({
      type: z.literal('homopolymer'),
      species: speciesSchema.default('A'),
      segmentLength,
    })
    .strict(),
  z
    .object({
      type: z.literal('blocks'),
      blocks: z.array(blockSchema).min(1).max(32),
    })
    .strict(),
]);

/** A prescribed external field on one species, in kT per chain (units of 1/N per segment). */
export const fieldSpecSchema = z.discriminatedUnion('type', [
  z.object({ type: z.literal('uniform'), value: z.number().min(-200).max(200) }).strict(),
  z
    .object({
      type: z.literal('cosine'),
      /** w(x) = offset + amplitude·cos(2π·mode·x/L). */
      amplitude: z.number().min(-200).max(200),
      mode: z.number().int().min(1).max(64).default(1),
      offset: z.number().min(-200).max(200).default(0),
    })
    .strict(),
  z.object({ type: z.literal('values'), values: z.array(z.number()).min(4) }).strict(),
]);

export const systemSchema = z
  .object({
    chain: chainSchema,
    /** Flory–Huggins χ times N. */
    chiN: z.number().min(0).max(500).default(0),
    /**
     * Prescribed fields turn the problem into a single-chain one (no self-consistency):
     * the chain sees exactly these fields. Species not named see zero.
     */
    externalField: z
      .object({ A: fieldSpecSchema.optional(), B: fieldSpecSchema.optional() })
      .strict()
      .optional(),
  })
  .strict();

export type ChainSpec = z.infer<typeof chainSchema>;
export type SystemSpec = z.infer<typeof systemSchema>;
export type SystemSpecInput = z.input<typeof systemSchema>;
export type FieldSpec = z.infer<typeof fieldSpecSchema>;
export type Species = z.infer<typeof speciesSchema>;

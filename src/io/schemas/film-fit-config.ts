/**
 * Config file kind "film-fit": fit the film model to a measured depth profile (φ_A or SLD) or
 * reflectivity curve (`invert --film`, `reflectivity DATA`). Flags override the file.
 *
 * Lengths (cell.thickness, cell.thicknessStart, fit.start.resolution) are in nm when
 * units.rgNm is given (always for reflectivity, whose Q is in Å⁻¹), else in Rg. SLDs are in
 * 10⁻⁶ Å⁻²; dQoverQ is the FWHM of the Gaussian Q resolution relative to Q; affinities in kT
 * per chain × Rg (docs/physics.md, "Films").
 */
import { z } from 'zod';
import { chainSchema } from '../../physics/chain-schema.js';
import { contourStepsSchema, gridPointsSchema, spectralSchema } from './spectral-schema.js';

const positive = z.number().gt(0);

/** SLDs of pure A, pure B, the substrate (below the bottom wall) and the medium above the film, 10⁻⁶ Å⁻². */
export const sldSchema = z.object({ A: z.number(), B: z.number(), substrate: z.number(), medium: z.number() }).strict();

const range = z
  .tuple([z.number(), z.number()])
  .refine((r) => r[0] < r[1], { message: 'must be [lo, hi] with lo < hi' });

export const filmFitConfigSchema = z
  .object({
    version: z.literal(2),
    kind: z.literal('film-fit'),
    system: z.object({ chain: chainSchema }).strict(),
    cell: z
      .object({
        /** The film's thickness, or "fit" (then thicknessStart starts the fit). */
        thickness: z.union([positive, z.literal('fit')]),
        thicknessStart: positive.optional(),
        /** Range of the walls' surface field, Rg. */
        walls: z.object({ range: z.number().gt(0).max(5).default(0.25) }).strict().prefault({}),
        nx: gridPointsSchema.default(32),
        ns: contourStepsSchema.default(60),
      })
      .strict()
      .superRefine((c, ctx) => {
        if (c.thickness === 'fit' && c.thicknessStart === undefined) ctx.addIssue({ code: 'custom', path: ['thicknessStart'], message: 'a fitted thickness needs a starting thickness' });
      }),
    solver: spectralSchema.pick({ tolerance: true, maxIterations: true, andersonHistory: true, andersonMixing: true }).prefault({}),
    units: z.object({ rgNm: positive.optional() }).strict().prefault({}),
    instrument: z
      .object({
        sld: sldSchema.optional(),
        /** Gaussian Q resolution, FWHM relative to Q (0: none). */
        dQoverQ: z.number().min(0).max(0.5).default(0),
        /** Constant background added to R. */
        background: z.number().min(0).default(0),
      })
      .strict()
      .prefault({}),
    fit: z
      .object({
        chiNRange: range.refine((r) => r[0] > 0, { message: 'χN must be > 0' }).default([5, 60]),
        affinityRange: range.default([-5, 5]),
        /** Starting values; affinities not given are tried with both signs at each wall. */
        start: z.object({ chiN: positive.optional(), bottom: z.number().optional(), top: z.number().optional(), resolution: z.number().min(0).optional() }).strict().prefault({}),
        /**
         * Parameters that get profile-likelihood intervals. χN by default: the affinities' profiles
         * are available but slow (measured: more than 7 minutes without finishing on a loaded
         * machine, where χN's took about a minute), because a strongly wetted wall saturates and
         * the profile wanders far.
         */
        intervals: z.array(z.enum(['chiN', 'bottom', 'top'])).default(['chiN']),
      })
      .strict()
      .prefault({}),
  })
  .strict();

export type FilmFitConfig = z.infer<typeof filmFitConfigSchema>;

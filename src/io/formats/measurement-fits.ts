/**
 * File kinds "bragg-fit" and "spacing-fit" (version 1): the result.json of `fit-bragg` and of
 * `fit-spacing`. Each carries the config it ran, the data as read, the model at the best fit,
 * the profile likelihood and its intervals, the assumptions and notes. Units: q in nm⁻¹, D,
 * Rg and b in nm, χN and χ dimensionless; a number a fit does not define is null.
 */
import { z } from 'zod';
import { formatHeader, provenanceSchema } from './file-format.js';

export const BRAGG_FIT_VERSION = 1;
export const SPACING_FIT_VERSION = 1;

const num = z.number();
const pair = z.tuple([num, num]);
const rangeFlags = z.object({ lo: z.boolean(), hi: z.boolean() }).strict();

export const braggFitFileSchema = z
  .object({
    ...formatHeader('bragg-fit', BRAGG_FIT_VERSION),
    provenance: provenanceSchema,
    config: z.unknown(),
    file: z.string(),
    /** The unit of the file's q column (q is converted to nm⁻¹ here). */
    qUnit: z.enum(['per_nm', 'per_A']),
    assumptions: z.array(z.string()),
    chiN: num,
    intervals: z.object({ '68.3%': z.object({ lo: num, hi: num, limitedByRange: rangeFlags }).strict(), '95%': z.object({ lo: num, hi: num, limitedByRange: rangeFlags }).strict() }).strict(),
    /** Δχ² that sets each level (with dof degrees of freedom). */
    thresholds: z.object({ '68.3%': num, '95%': num }).strict(),
    /** D from the positions, nm (D = 2π/slope of q_n against n), with its standard deviation. */
    periodNm: num,
    periodNmSd: num,
    /** The stress-free period in Rg at the best χN, and the Rg (nm) it implies with the measured D. */
    period: num,
    impliedRgNm: num,
    K: num,
    chi2: num,
    dof: z.number().int(),
    peaks: z.array(z.object({ order: z.number().int(), q: num, I: num, dI: num, relative: num, model: num, normalisedResidual: num }).strict()),
    profile: z.array(z.object({ chiN: num, deltaChi2: num }).strict()),
    rgTie: z.object({ rgNm: num, rgNmSd: num.nullable(), periodModelNm: num, pull: num }).strict().nullable(),
    notes: z.array(z.string()),
    evaluations: z.number().int(),
    seconds: num,
  })
  .strict();

export type BraggFitFile = z.infer<typeof braggFitFileSchema>;

export const spacingFitFileSchema = z
  .object({
    ...formatHeader('spacing-fit', SPACING_FIT_VERSION),
    provenance: provenanceSchema,
    config: z.unknown(),
    file: z.string(),
    assumptions: z.array(z.string()),
    chi: num,
    /** b in nm. */
    b: num,
    intervals: z.object({ '68.3%': z.object({ chi: pair, b: pair, limitedByRange: rangeFlags }).strict(), '95%': z.object({ chi: pair, b: pair, limitedByRange: rangeFlags }).strict() }).strict(),
    thresholds: z.object({ '68.3%': num, '95%': num }).strict(),
    chi2: num,
    dof: z.number().int(),
    sigma: z.object({ source: z.enum(['column', 'estimated']), value: num.nullable() }).strict(),
    chiRange: pair,
    /** Per chain length: D and dD measured (nm), χN, the stress-free period in Rg, and the model D (nm). */
    points: z.array(z.object({ N: num, D: num, dD: num.nullable(), chiN: num, period: num, model: num }).strict()),
    profile: z.array(z.object({ chi: num, deltaChi2: num }).strict()),
    notes: z.array(z.string()),
    evaluations: z.number().int(),
    seconds: num,
  })
  .strict();

export type SpacingFitFile = z.infer<typeof spacingFitFileSchema>;

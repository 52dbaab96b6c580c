/**
 * File kind "bragg-pattern" (version 1): the result.json of `bragg-pattern`, the Bragg peaks of
 * a lamella predicted from a solution file; and its two CSV files, written here from the same
 * values: peaks.csv (order, q, I_n/I_1) and pattern.csv (q, I of the drawn pattern of Gaussian
 * peaks of area I_n/I_1). q in `qUnit` (1/Rg, or nm⁻¹ when an Rg in nm was given); the period
 * in Rg (and in nm with an Rg); the peak width is a standard deviation in q's unit. pattern.csv
 * is read back here too (readBraggPatternCsv), for `report DIR`.
 */
import { z } from 'zod';
import { systemSchema } from '../../physics/chain-schema.js';
import { parseColumnCsv } from '../column-csv.js';
import { readInputText } from '../fs-errors.js';
import { formatHeader, formatText, provenanceSchema } from './file-format.js';

export const BRAGG_PATTERN_VERSION = 1;

export const braggPatternFileSchema = z
  .object({
    ...formatHeader('bragg-pattern', BRAGG_PATTERN_VERSION),
    provenance: provenanceSchema,
    /** The solution file the peaks were computed from, as the user gave it. */
    solution: z.string(),
    system: systemSchema,
    chiN: z.number(),
    /** The lamellar period D in Rg, and in nm when rgNm was given. */
    period: z.number().gt(0),
    rgNm: z.number().gt(0).optional(),
    periodNm: z.number().gt(0).optional(),
    qUnit: z.enum(['1/Rg', 'nm⁻¹']),
    orders: z.number().int().min(1),
    /** Whether I_n carries the powder Lorentz factor 1/q². */
    lorentz: z.boolean(),
    width: z.number().gt(0),
    peaks: z.array(z.object({ order: z.number().int().min(1), q: z.number(), relative: z.number().nullable() }).strict()),
  })
  .strict();

export type BraggPatternFile = z.infer<typeof braggPatternFileSchema>;

/** The drawn pattern (pattern.csv): I on q values in the file's qUnit. */
export interface BraggPatternCurve {
  q: number[];
  I: number[];
}

export function braggPeaksCsv(file: BraggPatternFile): string {
  return `order,q,relative\n${file.peaks.map((k) => `${k.order},${k.q},${k.relative}`).join('\n')}\n`;
}

export function braggPatternCsv(curve: BraggPatternCurve): string {
  return `q,I\n${curve.q.map((q, i) => `${q},${curve.I[i]}`).join('\n')}\n`;
}

/** pattern.csv read back (what `report DIR` draws). */
export function readBraggPatternCsv(path: string): BraggPatternCurve {
  const d = parseColumnCsv(readInputText(path), path, ['q', 'I']);
  return { q: Array.from(d.columns.q), I: Array.from(d.columns.I) };
}

/** Every file of a bragg-pattern --out. */
export function braggPatternFiles(file: BraggPatternFile, curve: BraggPatternCurve): Record<string, string> {
  return { 'peaks.csv': braggPeaksCsv(file), 'pattern.csv': braggPatternCsv(curve), 'result.json': formatText(braggPatternFileSchema, file) };
}

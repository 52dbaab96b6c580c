/**
 * File kind "fit-scattering-result" (version 2): the result.json of `fit-scattering`, one entry
 * per measured curve and, for a temperature series, the χ(T) line and transition temperatures;
 * and its one fit-<k>.csv per curve (data, model, residuals), written from the same entry.
 * q in the units of each file's q column (qUnit), Rg in nm, T in K.
 */
import { z } from 'zod';
import { scatteringConfigSchema } from '../schemas/scattering-config.js';
import { formatHeader, formatText, provenanceSchema } from './file-format.js';

export const SCATTERING_FIT_VERSION = 2;

const pair = z.tuple([z.number(), z.number()]);
const levels = z.object({ '68.3%': pair, '95%': pair }).strict();
const interval = z.object({ lo: z.number(), hi: z.number(), probability: z.number(), deltaChi2: z.number(), limitedByRange: z.object({ lo: z.boolean(), hi: z.boolean() }).strict() }).strict();
const fieller = z.union([z.object({ kind: z.literal('interval'), lo: z.number(), hi: z.number() }).strict(), z.object({ kind: z.literal('unbounded') }).strict()]);
const transition = z
  .object({ label: z.string(), chiN: z.number(), temperature: z.number(), intervals: z.object({ '68.3%': fieller, '95%': fieller }).strict(), nbar: z.number().optional() })
  .strict();

export const scatteringFitEntrySchema = z
  .object({
    file: z.string(),
    temperature: z.number().nullable(),
    chiN: z.number(),
    interval: pair,
    interval95: pair,
    intervals: z.object({ '68.3%': interval, '95%': interval }).strict(),
    rgNm: z.number(),
    rgMode: z.enum(['free', 'fixed', 'constrained']),
    K: z.number(),
    background: z.number(),
    chiNSpinodal: z.number(),
    qStar: z.number(),
    qUnit: z.enum(['per_nm', 'per_A']),
    chi2: z.number(),
    reducedChi2: z.number(),
    n: z.number().int(),
    p: z.number().int(),
    dof: z.number().int(),
    sigma: z.object({ source: z.enum(['column', 'estimated']), value: z.number().nullable() }).strict(),
    profileLikelihood: z.array(z.object({ chiN: z.number(), deltaChi2: z.number(), rgNm: z.number() }).strict()),
    points: z
      .object({ q: z.array(z.number()), I: z.array(z.number()), dI: z.array(z.number()).nullable(), model: z.array(z.number()), residual: z.array(z.number()), normalisedResidual: z.array(z.number()) })
      .strict(),
    warnings: z.array(z.string()),
    notes: z.array(z.string()),
    evaluations: z.number().int(),
    seconds: z.number(),
  })
  .strict();

export const scatteringResultSchema = z
  .object({
    ...formatHeader('fit-scattering-result', SCATTERING_FIT_VERSION),
    provenance: provenanceSchema,
    /** The config the fit ran (flags applied). */
    config: scatteringConfigSchema,
    assumptions: z.array(z.string()),
    fits: z.array(scatteringFitEntrySchema),
    series: z
      .object({
        chiNLine: z.object({ a: z.number(), b: z.number(), covariance: z.object({ aa: z.number(), bb: z.number(), ab: z.number() }).strict(), intervals: z.object({ a: levels, b: levels }).strict(), note: z.string() }).strict(),
        chi: z.object({ N: z.number(), A: z.number(), B: z.number(), intervals: z.object({ A: levels, B: levels }).strict(), note: z.string() }).strict().nullable(),
        chi2: z.number(),
        dof: z.number().int(),
        reducedChi2: z.number().nullable(),
        meanField: transition,
        fluctuationCorrected: transition.nullable(),
        band: z.array(z.object({ T: z.number(), chiN: z.number(), sd: z.number() }).strict()),
        warnings: z.array(z.string()),
        notes: z.array(z.string()),
        seconds: z.number(),
      })
      .strict()
      .nullable(),
    seconds: z.number(),
  })
  .strict();

export type ScatteringResultFile = z.infer<typeof scatteringResultSchema>;

export type ScatteringFitEntry = ScatteringResultFile['fits'][number];

/** fit-<k>.csv of the k-th curve (1-based, in the order of the result's fits): q in the file's unit, the data, the model and the residuals. */
export function scatteringFitCsvName(k: number): string {
  return `fit-${k}.csv`;
}

export function scatteringFitCsv(fit: ScatteringFitEntry): string {
  const p = fit.points;
  const rows = [`q_${fit.qUnit},I,dI,model,residual,normalised_residual`];
  for (let i = 0; i < p.q.length; i++) rows.push([p.q[i], p.I[i], p.dI ? p.dI[i] : '', p.model[i], p.residual[i], p.normalisedResidual[i]].join(','));
  return `${rows.join('\n')}\n`;
}

/** Every file of a fit-scattering --out: result.json through its schema and one fit-<k>.csv per curve. */
export function scatteringFitFiles(result: ScatteringResultFile): Record<string, string> {
  const files: Record<string, string> = { 'result.json': formatText(scatteringResultSchema, result) };
  result.fits.forEach((f, i) => (files[scatteringFitCsvName(i + 1)] = scatteringFitCsv(f)));
  return files;
}

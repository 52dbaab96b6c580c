/**
 * File kind "inversion" (version 2): `invert`'s result.json. One block per estimator under
 * `estimators` (classical; network with the same core fields plus its own), an `agreement`
 * block comparing them, the assumptions the χN rests on, and the estimates against the
 * truth for a synthetic profile. Lengths in Rg with `…Nm` copies when the data were in nm;
 * free energies in kT per chain. A number the method does not define (the network's χ²)
 * is null.
 */
import { z } from 'zod';
import { formatHeader, provenanceSchema } from './file-format.js';

export const INVERSION_VERSION = 2;

const num = z.number();
const maybe = num.nullable();
const pair = z.tuple([num, num]);

// An estimator without an interval (one network seed has no spread) writes null ends.
const intervalSchema = z
  .object({ lo: maybe, hi: maybe, probability: num, deltaChi2: maybe, limitedByRange: z.object({ lo: z.boolean(), hi: z.boolean() }).strict() })
  .strict();

/** The fields every estimator reports; an estimator adds its own (the network: seeds, runs, fields). */
export const estimatorBlockSchema = z
  .object({
    method: z.string(),
    status: z.literal('ok'),
    chiN: num,
    /** 68.3 % and 95 % intervals of χN. */
    interval: z.tuple([maybe, maybe]),
    interval95: z.tuple([maybe, maybe]),
    intervals: z.object({ '68.3%': intervalSchema, '95%': intervalSchema }).strict(),
    /** How the interval was obtained (profile likelihood; seed spread for a network). */
    intervalMethod: z.string(),
    offset: num,
    period: num,
    offsetNm: num.optional(),
    periodNm: num.optional(),
    periodMode: z.enum(['equilibrium', 'free', 'given']),
    chi2: maybe,
    reducedChi2: maybe,
    rss: num,
    rmsResidual: num,
    n: z.number().int(),
    p: z.number().int(),
    dof: z.number().int(),
    sigma: z.object({ source: z.enum(['column', 'estimated']), value: maybe, floored: z.boolean() }).strict(),
    seconds: num,
    /** What this estimator's χN rests on beyond the model and the data (the network: the classical fit's inputs it starts from and reads the data along). */
    restsOn: z.array(z.string()).optional(),
    profileLikelihood: z.array(z.object({ chiN: num, deltaChi2: num, period: num, offset: num }).strict()).optional(),
    fitCurve: z.object({ x: z.array(num), phiA: z.array(num) }).strict().optional(),
    points: z
      .object({ note: z.string(), x: z.array(num), phiA: z.array(num), sigma: z.array(num), fit: z.array(num), residual: z.array(num) })
      .strict()
      .optional(),
    runs: z.array(z.object({ seed: num, chiN: num, rmsResidual: num, seconds: num, trajectory: z.array(z.object({ step: num, chiN: maybe }).strict()) }).strict()).optional(),
  })
  .catchall(z.unknown());

export type EstimatorBlockFile = z.infer<typeof estimatorBlockSchema>;

export const agreementSchema = z
  .object({
    present: z.array(z.string()),
    compared: z.boolean(),
    note: z.string().optional(),
    pairs: z
      .array(
        z
          .object({
            a: z.string(),
            b: z.string(),
            difference: num,
            relativeDifference: num,
            /** Difference over the root-sum-square of the two one-sigma half-widths. */
            z: maybe,
            intervalsOverlap: z.boolean(),
            eachWithinOthersInterval: z.boolean(),
          })
          .strict(),
      )
      .optional(),
  })
  .strict();

export const truthComparisonSchema = z
  .object({
    source: z.string(),
    chiN: num,
    estimators: z.record(z.string(), z.object({ chiN: num, error: num, relativeError: num, exchangeFieldRelativeL2: num.optional() }).strict()),
  })
  .strict();

export const inversionResultSchema = z
  .object({
    ...formatHeader('inversion', INVERSION_VERSION),
    provenance: provenanceSchema,
    input: z
      .object({
        file: z.string(),
        n: z.number().int(),
        xRange: pair,
        units: z.object({ x: z.enum(['Rg', 'nm']), rgNm: num.optional(), rgFrom: z.string().optional() }).strict(),
        sigmaColumn: z.boolean(),
      })
      .strict(),
    /** The invert config that made the result (validated when it was read). */
    config: z.record(z.string(), z.unknown()),
    /** What the fitted χN rests on: read a χN used for materials design with these limits. */
    assumptions: z.array(z.string()),
    estimators: z.record(z.string(), estimatorBlockSchema),
    agreement: agreementSchema,
    truth: truthComparisonSchema.optional(),
    /** Wall time (s) of the whole inversion (every estimator), for the report's title page. */
    runSeconds: z.number().min(0).optional(),
  })
  .strict();

export type InversionResultFile = z.infer<typeof inversionResultSchema>;

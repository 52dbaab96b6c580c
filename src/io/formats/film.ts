/**
 * The files of films, each defined here once, written and read through its schema:
 *   - "film-fit-result" (version 1): a film fit (invert --film, film-fit), result.json;
 *   - "film-synth-truth" (version 1): what `synth --film` used, truth.json beside the data;
 *   - "film-reflectivity" (version 1): a computed reflectivity curve's settings and film, result.json.
 * Units: lengths in Rg unless a key ends in Nm (nm); SLDs in 10⁻⁶ Å⁻²; Q in Å⁻¹; affinities
 * in kT per chain × Rg; free energies in kT per chain.
 */
import { z } from 'zod';
import { chainSchema } from '../../physics/chain-schema.js';
import { filmFitConfigSchema } from '../schemas/film-fit-config.js';
import { formatHeader, provenanceSchema } from './file-format.js';

export const FILM_FIT_RESULT_VERSION = 1;
export const FILM_SYNTH_TRUTH_VERSION = 1;
export const FILM_REFLECTIVITY_VERSION = 1;

const dataKind = z.enum(['phi', 'sld', 'reflectivity']);
const intervalParam = z.enum(['chiN', 'bottom', 'top']);
const paramInterval = z
  .object({ lo: z.number(), hi: z.number(), probability: z.number(), deltaChi2: z.number(), limitedByRange: z.object({ lo: z.boolean(), hi: z.boolean() }).strict() })
  .strict();
const sldSet = z.object({ A: z.number(), B: z.number(), substrate: z.number(), medium: z.number() }).strict();

export const filmFitResultSchema = z
  .object({
    ...formatHeader('film-fit-result', FILM_FIT_RESULT_VERSION),
    provenance: provenanceSchema,
    config: filmFitConfigSchema,
    input: z
      .object({
        source: z.string(),
        dataKind,
        points: z.number().int().min(1),
        lengthUnits: z.enum(['Rg', 'nm']),
        rgNm: z.number().gt(0).optional(),
        sldUnits: z.string(),
        qUnits: z.string(),
      })
      .strict(),
    chiN: z.number(),
    affinity: z.object({ bottom: z.number(), top: z.number(), units: z.string() }).strict(),
    thickness: z.number(),
    thicknessNm: z.number().optional(),
    thicknessFitted: z.boolean(),
    resolution: z.number(),
    resolutionNm: z.number().optional(),
    offset: z.number().optional(),
    offsetNm: z.number().optional(),
    intervals: z.partialRecord(intervalParam, z.object({ '68.3%': paramInterval, '95%': paramInterval }).strict()),
    profiles: z.partialRecord(intervalParam, z.array(z.object({ value: z.number(), deltaChi2: z.number() }).strict())),
    chi2: z.number(),
    reducedChi2: z.number(),
    n: z.number().int(),
    p: z.number().int(),
    dof: z.number().int(),
    sigma: z.union([z.object({ source: z.literal('column') }).strict(), z.object({ source: z.literal('estimated'), value: z.number().nullable() }).strict()]),
    layers: z.string(),
    freeEnergy: z.number(),
    seconds: z.object({ fit: z.number(), intervals: z.number(), total: z.number() }).strict(),
    cost: z.object({ solves: z.number(), failedSolves: z.number(), fullSolves: z.number(), iterations: z.number(), lmIterations: z.number(), solveSeconds: z.number() }).strict(),
    warnings: z.array(z.string()),
    notes: z.array(z.string()),
    assumptions: z.array(z.string()),
    /** The data against the model, in the file's own units (what a report draws; fit.csv has the same). */
    curve: z.object({ xUnits: z.string(), yUnits: z.string(), x: z.array(z.number()), y: z.array(z.number()), sigma: z.array(z.number()), fit: z.array(z.number()) }).strict(),
  })
  .strict();
export type FilmFitResultFile = z.infer<typeof filmFitResultSchema>;

export const filmSynthTruthSchema = z
  .object({
    ...formatHeader('film-synth-truth', FILM_SYNTH_TRUTH_VERSION),
    provenance: provenanceSchema,
    measurement: dataKind,
    chain: chainSchema,
    chiN: z.number().gt(0),
    affinity: z.object({ bottom: z.number(), top: z.number() }).strict(),
    thickness: z.number().gt(0),
    thicknessNm: z.number().gt(0).optional(),
    rgNm: z.number().gt(0).optional(),
    resolution: z.number().min(0),
    offset: z.number(),
    wallRange: z.number().gt(0),
    points: z.number().int().min(1),
    noise: z.number().min(0),
    seed: z.number().int(),
    nx: z.number().int(),
    ns: z.number().int(),
    layers: z.string(),
    freeEnergy: z.number(),
    sld: sldSet.optional(),
    sldUnits: z.string().optional(),
    dQoverQ: z.number().min(0).optional(),
    qRange: z.tuple([z.number(), z.number()]).optional(),
    note: z.string(),
  })
  .strict();
export type FilmSynthTruth = z.infer<typeof filmSynthTruthSchema>;

export const filmReflectivitySchema = z
  .object({
    ...formatHeader('film-reflectivity', FILM_REFLECTIVITY_VERSION),
    provenance: provenanceSchema,
    settings: z
      .object({
        f: z.number(),
        chiN: z.number(),
        affinity: z.object({ bottom: z.number(), top: z.number() }).strict(),
        thicknessNm: z.number(),
        thickness: z.number(),
        rgNm: z.number(),
        resolutionNm: z.number(),
        sld: sldSet,
        sldUnits: z.string(),
        dQoverQ: z.number(),
        background: z.number(),
        qRange: z.tuple([z.number(), z.number()]),
        points: z.number().int(),
        nx: z.number().int(),
        ns: z.number().int(),
        wallRange: z.number(),
      })
      .strict(),
    phase: z.string(),
    layers: z.string(),
    freeEnergy: z.number(),
    converged: z.boolean(),
    slices: z.number().int(),
    seconds: z.number(),
  })
  .strict();
export type FilmReflectivityFile = z.infer<typeof filmReflectivitySchema>;

/**
 * The files of a surrogate run (surrogate/surrogate-checkpoint.ts writes them, predict and
 * reports read them):
 *   checkpoint.json  kind "surrogate-checkpoint" (version 2): config, provenance, the period
 *                    model, the anchors, the training history, the metrics, the weight manifest
 *   metrics.json     the metrics (`surrogateMetricsSchema`): the error map at held-out points
 *                    and the timing against reference solves
 *   prediction.json  kind "prediction" (version 1): `predict`'s answer at one parameter point
 * Lengths in Rg, free energies in kT per chain, times in seconds (wall time).
 */
import { z } from 'zod';
import { surrogateConfigSchema } from '../schemas/surrogate-config.js';
import { formatHeader, provenanceSchema } from './file-format.js';
import { networkProvenanceSchema, weightSpecSchema } from './training.js';

export const SURROGATE_CHECKPOINT_VERSION = 2;
export const PREDICTION_VERSION = 1;

/** A parameter point: χN, f and b_A/b_B (segmentRatio). */
export const parameterPointSchema = z.object({ chiN: z.number(), f: z.number(), segmentRatio: z.number() }).strict();

export const surrogateHistorySchema = z
  .object({
    /** 0: the fit to the reference data; k ≥ 1: physics round k. */
    round: z.number().int().min(0),
    /** Largest SCFT residual max |d| (kT) over the round's points before its update (null for the fit). */
    residual: z.number().nullable(),
    fitLoss: z.number(),
    seconds: z.number(),
    /** Largest held-out φ_A relative L2 error, when evaluated. */
    phiError: z.number().optional(),
  })
  .strict();

const stat = z.object({ max: z.number(), mean: z.number() }).strict();

export const heldOutErrorSchema = z
  .object({
    point: parameterPointSchema,
    phiA: z.object({ relativeL2: z.number(), maxError: z.number() }).strict(),
    exchangeFieldRelativeL2: z.number(),
    /** F_surrogate − F_reference, kT per chain. */
    freeEnergyError: z.number(),
    QRelativeError: z.number(),
    period: z.object({ surrogate: z.number(), reference: z.number(), relativeError: z.number() }).strict(),
    /** φ_A relative L2 error of the anchors' profiles interpolated to this point. */
    anchorInterpolationPhiA: z.number(),
  })
  .strict();

export const SURROGATE_METRICS_VERSION = 1;

export const surrogateMetricsSchema = z
  .object({
    /** metrics.json of a surrogate run (also embedded in its checkpoint). */
    ...formatHeader('surrogate-metrics', SURROGATE_METRICS_VERSION),
    backend: z.string(),
    tfjs: z.string(),
    parameters: z.array(z.object({ name: z.enum(['chiN', 'f', 'segmentRatio']), min: z.number(), max: z.number(), anchors: z.number().int() }).strict()).min(1),
    fixed: parameterPointSchema.partial(),
    errors: z
      .object({ points: z.number().int(), phiARelativeL2: stat, freeEnergyError: stat, QRelativeError: stat, periodRelativeError: stat, anchorInterpolationPhiA: stat })
      .strict(),
    heldOut: z.array(heldOutErrorSchema),
    timing: z
      .object({
        /** Median wall time of one reference solve at the equilibrium period, s. */
        referenceSolveSeconds: z.number(),
        /** Median wall time of one surrogate query (fields + one propagator solve), after start-up, s. */
        querySeconds: z.number(),
        speedup: z.number(),
        anchorSeconds: z.number(),
        extraSolves: z.object({ count: z.number().int(), seconds: z.number() }).strict(),
        /** Reference solves placed by the network's residual after the first fit, and the continued fit (absent before adaptive sampling existed). */
        adaptiveSolves: z.object({ count: z.number().int(), seconds: z.number(), fitSeconds: z.number(), points: z.array(parameterPointSchema) }).strict().optional(),
        fitSeconds: z.number(),
        roundsSeconds: z.number(),
        buildSeconds: z.number(),
        equivalentReferenceSolves: z.number(),
        heldOutSeconds: z.number(),
      })
      .strict(),
    training: z
      .object({
        fit: z
          .object({
            /** The fit's optimiser (absent in files written before it was selectable: 'adam-lbfgs'). */
            method: z.enum(['adam-lbfgs', 'levenberg-marquardt']).optional(),
            adamSteps: z.number().int(),
            lbfgsIterations: z.number().int(),
            /** Levenberg–Marquardt iterations run (method 'levenberg-marquardt'). */
            lmIterations: z.number().int().optional(),
            points: z.number().int(),
            finalLoss: z.number(),
            seconds: z.number(),
          })
          .strict(),
        rounds: z.number().int(),
        lastResidual: z.number().nullable(),
      })
      .strict(),
  })
  .strict();

export type SurrogateMetrics = z.infer<typeof surrogateMetricsSchema>;

export const surrogateCheckpointSchema = z
  .object({
    ...formatHeader('surrogate-checkpoint', SURROGATE_CHECKPOINT_VERSION),
    provenance: networkProvenanceSchema,
    config: surrogateConfigSchema,
    periodModel: z.object({ axes: z.array(z.array(z.number())), periods: z.array(z.number().gt(0)) }).strict(),
    anchors: z.array(z.object({ point: parameterPointSchema, period: z.number(), freeEnergy: z.number() }).strict()),
    history: z.array(surrogateHistorySchema),
    metrics: surrogateMetricsSchema.optional(),
    weightSpecs: z.array(weightSpecSchema),
    weightBytes: z.number().int().min(0),
  })
  .strict();

export type SurrogateCheckpointFile = z.infer<typeof surrogateCheckpointSchema>;
export type SurrogateHistoryEntry = z.infer<typeof surrogateHistorySchema>;

/** `predict`'s answer (surrogate/predict.ts), as written by `predict --json` / `--out`. */
export const predictionSchema = z
  .object({
    ...formatHeader('prediction', PREDICTION_VERSION),
    checkpoint: z.string(),
    provenance: provenanceSchema,
    trainedRange: z.array(z.object({ name: z.string(), min: z.number(), max: z.number() }).strict()),
    /** The point lies outside the trained range (asked for with --allow-extrapolation). */
    extrapolated: z.boolean(),
    /** Checks that failed on an extrapolated answer (φA + φB ≠ 1, a large field residual): read it as unreliable. */
    warnings: z.array(z.string()),
    heldOutErrors: z.object({ phiARelativeL2Max: z.number(), freeEnergyErrorMax: z.number() }).strict().optional(),
    point: parameterPointSchema,
    outside: z.array(z.string()),
    phase: z.string(),
    period: z.number(),
    freeEnergy: z.number(),
    freeEnergyDisordered: z.number(),
    Q: z.number(),
    QDagger: z.number(),
    residual: z.number(),
    incompressibilityMax: z.number(),
    seconds: z.number(),
    x: z.array(z.number()),
    t: z.array(z.number()),
    phiA: z.array(z.number()),
    phiB: z.array(z.number()),
    wA: z.array(z.number()),
    wB: z.array(z.number()),
  })
  .strict();

export type PredictionFile = z.infer<typeof predictionSchema>;

/**
 * The files of a training run (training/checkpoint.ts writes them, reports read them):
 *   checkpoint.json  kind "checkpoint" (version 3): config, provenance, step, stage, loss
 *                    weights, the loss history of every phase, the metrics, the field
 *                    updates' lamella pin, the weight manifest
 *   metrics.json     the run's metrics (`trainMetricsSchema`): errors against the reference,
 *                    the two solutions' summaries, what each training phase did
 * Losses are dimensionless mean squares; seconds are wall time since the run started.
 */
import { z } from 'zod';
import { trainConfigSchema } from '../schemas/train-config.js';
import { formatHeader } from './file-format.js';
import { solutionSummarySchema } from './solution.js';

/** 3: the field updates' lamella pin (`fieldPin`), so a resume pins where the run it continues did. */
export const CHECKPOINT_VERSION = 3;

/** The named loss terms of a network run (network/losses/terms.ts builds one per name). */
export const LOSS_TERMS = ['mde', 'periodicity', 'initial', 'incompressibility', 'selfConsistency', 'gauge'] as const;
export type LossTerm = (typeof LOSS_TERMS)[number];

const lossRecord = z.object(Object.fromEntries(LOSS_TERMS.map((k) => [k, z.number()])) as Record<LossTerm, z.ZodNumber>).strict();
// Balancing factors: 1 is "unbalanced".
const factorRecord = z.object(Object.fromEntries(LOSS_TERMS.map((k) => [k, z.number().default(1)])) as Record<LossTerm, z.ZodDefault<z.ZodNumber>>).strict();

export const historyEntrySchema = z
  .object({
    step: z.number().int(),
    stage: z.enum(['warm-start', 'adam', 'lbfgs', 'second-order']),
    /** The loss of the stage's own objective (second-order: Σ r², the weighted terms of the whole system). */
    total: z.number(),
    terms: lossRecord.partial(),
    learningRate: z.number(),
    seconds: z.number(),
    phiError: z.number().optional(),
    /** L-BFGS entries: iterations done so far (the Adam step count stays in `step`). */
    lbfgsIterations: z.number().int().min(0).optional(),
    /** Second-order entries: Levenberg–Marquardt iterations done so far, and the damping μ after the iteration. */
    secondOrderIterations: z.number().int().min(0).optional(),
    damping: z.number().optional(),
    /** Seconds since the run started (reference solve and warm start included): the report's wall-time axis over every phase. */
    wallSeconds: z.number().optional(),
  })
  .strict();

/** Which state the saved weights hold: where in the run, and its reference error when measured. */
export const heldStateSchema = z
  .object({
    stage: z.enum(['warm-start', 'adam', 'lbfgs', 'second-order']),
    step: z.number().int().min(0),
    lbfgsIterations: z.number().int().min(0).optional(),
    secondOrderIterations: z.number().int().min(0).optional(),
    phiError: z.number().optional(),
    /** Why this state: the lowest reference error measured, or the last state when none was measured. */
    chosenBy: z.enum(['lowest-reference-error', 'last']),
  })
  .strict();
export type HeldState = z.infer<typeof heldStateSchema>;

/** The run's verdict (training/run-verdict.ts): target met and ordered where the reference is. */
const verdictSchema = z.object({ ok: z.boolean(), aboveTarget: z.boolean().nullable(), ordered: z.boolean().nullable(), warnings: z.array(z.string()), summary: z.string() }).strict();

const errorPair = z.object({ relativeL2: z.number(), maxError: z.number() }).strict();

/** A network solution against the reference on the same grid (physics/solution-metrics.ts). */
export const solutionErrorsSchema = z
  .object({
    phiA: errorPair,
    exchangeField: errorPair,
    QRelativeError: z.number(),
    freeEnergyError: z.number(),
    /** max |φA + φB − 1|; absent for a chain in prescribed fields, where it is no constraint. */
    incompressibilityMax: z.number().optional(),
  })
  .strict();

/** Adam steps and training seconds to reach the target φA error. */
const reachedSchema = z.object({ adamSteps: z.number(), seconds: z.number() }).strict();

export const transferReportSchema = z
  .object({
    targetPhiError: z.number(),
    transfer: reachedSchema.nullable(),
    baseline: z
      .object({ reached: z.boolean(), adamSteps: z.number(), seconds: z.number(), warmStartAdamSteps: z.number(), warmStartSeconds: z.number(), finalPhiError: z.number() })
      .strict()
      .optional(),
    saved: z.object({ adamSteps: z.number(), seconds: z.number(), lowerBound: z.boolean() }).strict().nullable().optional(),
  })
  .strict();

export const trainMetricsSchema = z
  .object({
    backend: z.string(),
    tfjs: z.string(),
    /** The network's phase when the verdict is ok; 'unconfirmed' otherwise. */
    phase: z.string(),
    /** The phase the network's own φA spread gives, whatever the verdict. */
    networkPhase: z.string(),
    verdict: verdictSchema,
    collapsed: z.boolean(),
    sharedPropagator: z.boolean(),
    errors: solutionErrorsSchema,
    /** Loss terms on 1024 fresh random points, after training. */
    freshResiduals: lossRecord,
    reference: solutionSummarySchema,
    network: solutionSummarySchema,
    /**
     * What each phase did. Loose on purpose: a training phase added later records its own
     * block here; the blocks below are checked.
     */
    training: z
      .object({
        stopReason: z.enum(['completed', 'target-reached', 'interrupted', 'diverged']),
        message: z.string(),
        adamSteps: z.number().int().min(0),
        seconds: z.number(),
        warmStart: z.object({ adamSteps: z.number().int().min(0), seconds: z.number(), finalLoss: z.number() }).strict().optional(),
        lbfgs: z.object({ iterations: z.number().int().min(0), finalLoss: z.number(), reason: z.string() }).strict().optional(),
        secondOrder: z
          .object({
            iterations: z.number().int().min(0),
            finalLoss: z.number(),
            reason: z.string(),
            seconds: z.number(),
            best: z.object({ iteration: z.number(), loss: z.number(), phiError: z.number().optional() }).strict(),
            /**
             * The alternating strategy's field steps: after which iteration, the networks' SCFT
             * deviation max |d| (kT) before the step, and the field network's refit RMS (kT).
             */
            fieldSteps: z.array(z.object({ cycle: z.number().int(), afterIteration: z.number().int(), residual: z.number(), fitRms: z.number(), move: z.number().optional() }).strict()).optional(),
          })
          .strict()
          .optional(),
        /** Which state the saved networks hold (the best measured, or the last). */
        holds: heldStateSchema.optional(),
        reachedTarget: z.object({ step: z.number(), seconds: z.number(), lbfgsIterations: z.number().optional(), secondOrderIterations: z.number().optional() }).strict().optional(),
        transferredFrom: z.object({ checkpoint: z.string(), chiN: z.number(), f: z.number() }).strict().optional(),
        transfer: transferReportSchema.optional(),
        resumedFrom: z.object({ checkpoint: z.string(), step: z.number() }).strict().optional(),
      })
      .loose(),
    /** Wall time of the whole run in seconds: reference solve, warm start, training and the final evaluation (absent in a checkpoint written mid-run). */
    runSeconds: z.number().min(0).optional(),
  })
  .strict();

export type TrainMetrics = z.infer<typeof trainMetricsSchema>;

export const TRAIN_METRICS_VERSION = 1;

/** metrics.json of a training run: the metrics under a file header. */
export const trainMetricsFileSchema = trainMetricsSchema.extend(formatHeader('train-metrics', TRAIN_METRICS_VERSION));
export type TransferReport = z.infer<typeof transferReportSchema>;

const weightSpecSchema = z.object({ name: z.string(), shape: z.array(z.number().int()), dtype: z.string() }).loose();
const networkProvenanceSchema = z.object({ tool: z.literal('mesofield'), version: z.string(), node: z.string(), createdAt: z.string(), backend: z.string(), tfjs: z.string() }).strict();

/** checkpoint.json as this version writes it. */
export const checkpointWrittenSchema = z
  .object({
    ...formatHeader('checkpoint', CHECKPOINT_VERSION),
    provenance: networkProvenanceSchema,
    config: trainConfigSchema,
    /** Cell length L (a film's thickness H) in Rg the networks were built for (features depend on it). */
    length: z.number().gt(0),
    /** Lamellar periods in a periodic cell; 0 for a film (its walls, not periods, fix the layers). */
    periods: z.number().int().min(0),
    step: z.number().int().min(0),
    stage: z.enum(['warm-start', 'adam', 'lbfgs', 'second-order', 'done']),
    /** The state the weights hold (final checkpoints): the best one kept, not necessarily the last. */
    holds: heldStateSchema.optional(),
    lossWeights: factorRecord,
    history: z.array(historyEntrySchema),
    metrics: trainMetricsSchema.optional(),
    /** The resampled MDE points in use at this step, so that a resumed run is exact. */
    extraPoints: z
      .object({ q: z.object({ x: z.array(z.number()), s: z.array(z.number()) }).strict(), qDagger: z.object({ x: z.array(z.number()), s: z.array(z.number()) }).strict() })
      .strict()
      .nullable()
      .optional(),
    /**
     * The alternating strategy's field updates hold the lamella's phase (radians of the
     * harmonic with `periods` periods in the cell) fixed from their first update on
     * (network/field-update.ts); null before the first update or without a translation mode.
     */
    fieldPin: z.object({ periods: z.number().int().min(1), phase: z.number() }).strict().nullable(),
    /** tfjs weight manifest of weights.bin (tf.io.encodeWeights). */
    weightSpecs: z.array(weightSpecSchema),
    weightBytes: z.number().int().min(0),
  })
  .strict();

/**
 * A version-2 checkpoint (before the pin was saved) reads as version 3 with no pin: a resume of
 * it takes the pin at its first field update, as version 2 runs did. Any other version is refused.
 */
function fromVersion2(raw: unknown): unknown {
  if (raw === null || typeof raw !== 'object') return raw;
  const r = raw as Record<string, unknown>;
  return r.kind === 'checkpoint' && r.version === 2 && !('fieldPin' in r) ? { ...r, version: CHECKPOINT_VERSION, fieldPin: null } : raw;
}

/** checkpoint.json as every reader takes it (versions 2 and 3); writers go through checkpointWrittenSchema. */
export const checkpointFileSchema = z.preprocess(fromVersion2, checkpointWrittenSchema);

export type CheckpointFile = z.infer<typeof checkpointWrittenSchema>;
export type HistoryEntry = z.infer<typeof historyEntrySchema>;
export { weightSpecSchema, networkProvenanceSchema };

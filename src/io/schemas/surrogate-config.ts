/**
 * Config file kind "surrogate": one field network for a range of parameters (χN, and
 * optionally f and b_A/b_B), fitted to reference solutions at anchor points and trained on
 * the SCFT self-consistency everywhere in the range, then checked at held-out points
 * (src/surrogate/).
 *
 * Lengths in Rg of a chain whose segments have the reference length b = b_B
 * (docs/physics.md): a ratio r = b_A/b_B gives segment lengths { A: r, B: 1 }, as in a sweep.
 */
import { z } from 'zod';
import { fieldNetworkSchema } from './network-schema.js';
import { configVersionSchema } from './config-version.js';
import { contourStepsSchema, gridPointsSchema } from './spectral-schema.js';
import { rangeSystemSchema, sweepConfigSchema } from './sweep-config.js';

/** A trained range [min, max] with `anchors` evenly spaced reference points (ends included). */
function range(value: z.ZodNumber) {
  return z
    .object({
      min: value,
      max: value,
      /** Reference solves (equilibrium period) spread evenly over [min, max], ends included. */
      anchors: z.number().int().min(2).max(33).default(5),
    })
    .strict()
    .refine((r) => r.min < r.max, { message: 'must have min < max (a fixed value is given as a plain number)' })
    .meta({ constraint: 'min < max' });
}

export const surrogateConfigSchema = z
  .object({
    version: configVersionSchema,
    kind: z.literal('surrogate'),
    /** Chain architecture, as in a sweep; f and b_A/b_B come from `parameters`. */
    system: rangeSystemSchema,
    parameters: z
      .object({
        /** χN range; the lamella must be ordered at every anchor (above the order–disorder transition). */
        chiN: range(z.number().gt(0).max(500)),
        /** A fraction: a fixed number, or a range (each block takes its own contour steps, so f may vary continuously). */
        f: z.union([z.number().gt(0).lt(1), range(z.number().gt(0).lt(1))]).default(0.5),
        /** Conformational asymmetry b_A/b_B: a fixed number, or a range. */
        segmentRatio: z.union([z.number().gt(0).lte(10), range(z.number().gt(0).lte(10))]).default(1),
      })
      .strict(),
    /** Grid of every reference solve (anchors, extra data, held-out points) and of the surrogate's single-chain solve; one period per cell. */
    cell: z.object({ nx: gridPointsSchema.default(64), ns: contourStepsSchema.default(100) }).strict().prefault({}),
    /** Spectral solver settings of every reference solve (start "file" is not allowed). */
    solver: sweepConfigSchema.shape.solver,
    backend: z.enum(['auto', 'native', 'wasm', 'cpu']).default('auto'),
    networks: z
      .object({
        /** The field network w(x; θ): periodic features of x/L(θ) and the normalised parameters as inputs. */
        field: fieldNetworkSchema.prefault({}),
      })
      .strict()
      .prefault({}),
    warmStart: z
      .object({
        /**
         * How the field network is fitted to target fields (here and in every physics round):
         * 'adam-lbfgs' (Adam steps, then L-BFGS iterations, float32 gradients), or
         * 'levenberg-marquardt' (damped Gauss–Newton in float64 on the misfit of every value,
         * `lmIterations` here and training.fitIterations per round; docs/surrogate.md).
         */
        method: z.enum(['adam-lbfgs', 'levenberg-marquardt']).default('adam-lbfgs'),
        /** Levenberg–Marquardt iterations of the fit to the reference fields (method 'levenberg-marquardt'). */
        lmIterations: z.number().int().min(1).max(100000).default(200),
        /** Adam steps, then L-BFGS iterations, fitting the field network to the reference fields (anchors and extra solves). */
        adamSteps: z.number().int().min(0).max(100000).default(200),
        learningRate: z.number().gt(0).lt(1).default(5e-3),
        lbfgsIterations: z.number().int().min(0).max(100000).default(1000),
        /**
         * Extra reference solves at random parameter points (cell length from the anchors'
         * period interpolation), fitted like the anchors: the surrogate is then partly a fit.
         */
        extraSolves: z.number().int().min(0).max(10000).default(0),
        /**
         * Adaptive sampling: after the fit, reference solves at this many points where the
         * network's SCFT residual is largest (ranked over `adaptiveCandidates` seeded uniform
         * draws, spread at least half an anchor cell apart), then the fit continued on all the
         * data for `adaptiveIterations` (LM iterations, or L-BFGS iterations after the Adam
         * steps with 'adam-lbfgs'). The held-out points play no part in the choice.
         */
        adaptiveSolves: z.number().int().min(0).max(10000).default(0),
        adaptiveCandidates: z.number().int().min(1).max(100000).default(256),
        adaptiveIterations: z.number().int().min(1).max(100000).default(50),
      })
      .strict()
      .prefault({}),
    training: z
      .object({
        /**
         * Physics rounds: at the anchors and `pointsPerRound` parameter points drawn afresh each
         * round, the single-chain solve in the network's fields gives φ, the SCFT update
         * w + mixing·d of physics/scft-equations.ts gives the new fields, and the field network
         * is refitted to them (fitIterations of L-BFGS, or of Levenberg–Marquardt with
         * warmStart.method 'levenberg-marquardt').
         */
        rounds: z.number().int().min(0).max(100000).default(10),
        pointsPerRound: z.number().int().min(0).max(1000).default(16),
        mixing: z.number().gt(0).lte(1).default(0.5),
        fitIterations: z.number().int().min(1).max(10000).default(20),
        /** Held-out error evaluated every this many rounds, into the history (0: only at the end). */
        evaluateEvery: z.number().int().min(0).default(5),
        seed: z.number().int().min(0).max(0xffffffff).default(7),
      })
      .strict()
      .prefault({}),
    evaluation: z
      .object({
        /** Held-out points: the centres of the anchor cells, plus this many random points. */
        random: z.number().int().min(0).max(1000).default(2),
        seed: z.number().int().min(0).max(0xffffffff).default(11),
      })
      .strict()
      .prefault({}),
  })
  .strict();

export type SurrogateConfig = z.infer<typeof surrogateConfigSchema>;
export type SurrogateConfigInput = z.input<typeof surrogateConfigSchema>;

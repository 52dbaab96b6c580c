/**
 * Config file kind "invert": recover χN from a measured profile. Every length here (a given
 * period, the resolution) is in the units of the profile's x column: Rg, or nm when units
 * gives an Rg in nm. Command-line flags override the file.
 */
import { z } from 'zod';
import { chainSchema } from '../../physics/chain-schema.js';
import { configVersionSchema } from './config-version.js';
import { contourStepsSchema, gridPointsSchema, spectralSchema } from './spectral-schema.js';

const positive = z.number().gt(0);

export const invertConfigSchema = z
  .object({
    version: configVersionSchema,
    kind: z.literal('invert'),
    /** The chain of known architecture; χN is the unknown, so there is no chiN here. */
    system: z.object({ chain: chainSchema }).strict(),
    /** The model lamella: one period per cell, on nx grid points and ns contour steps. */
    cell: z
      .object({
        /** "equilibrium": the stress-free period at each trial χN; "free": fitted to the data; a number: given (in the profile's x units). */
        period: z.union([z.enum(['equilibrium', 'free']), positive]).default('equilibrium'),
        nx: gridPointsSchema.default(64),
        ns: contourStepsSchema.default(100),
      })
      .strict()
      .prefault({}),
    /** Search range of χN [lo, hi]; default [1.01 (χN)_spinodal, 60]. */
    chiNRange: z
      .tuple([positive, positive])
      .refine((r) => r[0] < r[1], { message: 'must be [lo, hi] with lo < hi' })
      .meta({ constraint: 'lo < hi' })
      .optional(),
    /** Gaussian instrument resolution (standard deviation); 0 for none. */
    resolution: z.number().min(0).default(0),
    method: z.enum(['classical', 'network', 'both']).default('classical'),
    /** x in nm: Rg in nm directly, or from N segments of length b (Rg = b·sqrt(N/6)). */
    units: z
      .object({ rgNm: positive.optional(), rgNmSd: positive.optional(), segments: positive.optional(), segmentLengthNm: positive.optional() })
      .strict()
      .optional(),
    /**
     * Standard deviations of assumed model inputs (units.rgNmSd is the one of Rg): each is
     * profiled into the χN interval as a nuisance parameter under a Gaussian constraint.
     */
    uncertainty: z.object({ f: positive.optional(), segmentRatio: positive.optional() }).strict().optional(),
    solver: spectralSchema.pick({ tolerance: true, maxIterations: true, andersonHistory: true, andersonMixing: true }).prefault({}),
    /** The network estimator (method "network" or "both"). */
    network: z
      .object({
        /** Independent seeded trainings; their spread is reported. */
        seeds: z.number().int().min(1).max(16).default(3),
        /**
         * Adam steps fitting each seed's networks to the classical fit's spectral solution before
         * χN moves. Fewer leave the propagators far from that solution and χN can wander (100
         * steps took the noiseless χN = 15 case to 16.2 on a 32 × 60 grid).
         */
        warmStartSteps: z.number().int().min(0).max(100000).default(400),
        /** Adam steps per seed (field/χN updates every fieldUpdateEvery of them). */
        adamSteps: z.number().int().min(50).max(100000).default(200),
        /** Steps between field/χN updates. */
        fieldUpdateEvery: z.number().int().min(10).default(50),
        /** L-BFGS iterations on the MDE after the Adam steps, a field/χN update before every lbfgsPerUpdate of them (0: none). */
        lbfgsIterations: z.number().int().min(0).max(100000).default(1200),
        lbfgsPerUpdate: z.number().int().min(10).max(10000).default(100),
        /** χN the networks start from; default the classical estimate. */
        chiNStart: positive.optional(),
        /**
         * 'least-squares': χN a parameter of one least-squares problem with the SCFT and data
         * residuals, Levenberg–Marquardt in float64 (docs/inverse.md); 'adam-lbfgs': the
         * data-driven SCFT iteration (Adam, L-BFGS cycles, field/χN updates). Each reads only its
         * own keys (NETWORK_STRATEGY_KEYS); a key of the other strategy is an error.
         */
        strategy: z.enum(['least-squares', 'adam-lbfgs']).default('least-squares'),
        /**
         * Cycles of the 'least-squares' strategy with χN free (after 2 with χN held), each one
         * Levenberg–Marquardt iteration of the joint problem and 4 of each propagator on its MDE.
         * 16 (the estimator's own default, inverse/network-estimator.ts): χN from 13.5 within 6e-4
         * of a noiseless χN = 15 on five network seeds (docs/inverse.md).
         */
        secondOrderIterations: z.number().int().min(1).max(10000).default(16),
        /** Weight λ of the data rows beside the SCFT residuals ('least-squares'). */
        dataWeight: positive.default(30),
        backend: z.enum(['auto', 'native', 'wasm', 'cpu']).default('auto'),
      })
      .strict()
      .prefault({}),
    /** Extra evenly spaced points on the profile-likelihood curve (for reports). */
    profilePoints: z.number().int().min(0).max(100).default(9),
  })
  .strict();

export type InvertConfig = z.infer<typeof invertConfigSchema>;

/** The network block's keys that only one strategy reads (the rest are shared). */
export const NETWORK_STRATEGY_KEYS = {
  'least-squares': ['secondOrderIterations', 'dataWeight'],
  'adam-lbfgs': ['warmStartSteps', 'adamSteps', 'fieldUpdateEvery', 'lbfgsIterations', 'lbfgsPerUpdate'],
} as const;

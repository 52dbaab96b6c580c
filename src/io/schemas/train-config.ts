/**
 * Config file kind "train": a physics-informed network for one system, its reference,
 * its losses and its training schedule.
 */
import { z } from 'zod';
import { systemSchema } from '../../physics/chain-schema.js';
import { fieldNetworkSchema, propagatorNetworkSchema } from './network-schema.js';
import { configVersionSchema } from './config-version.js';
import { cellSchema, spectralSchema } from './spectral-schema.js';

/**
 * A loss weight: ≥ 0 and at most 1e6. A larger one swamps every other term and overflows
 * float32 once multiplied by a loss of order one (1e308 was accepted and trained on NaN).
 */
const lossWeight = (d: number) => z.number().min(0).max(1e6).default(d);

export const lossWeightsSchema = z
  .object({
    /** MDE residual of q and of q† (in ln q form), mean square over collocation points. */
    mde: lossWeight(1),
    /**
     * Soft periodicity only: (Δu)² + (Δ∂x u)² between x = 0 and x = L, u = ln q, mean over
     * the contour nodes. The alternating strategy trains the propagators on the MDE (weight 1)
     * plus this and `initial` at the weights given here.
     */
    periodicity: lossWeight(1),
    /**
     * Soft initial condition only: (ln q(x, 0))², mean over the x grid, both propagators.
     * Default 100: measured best of 1, 10, 100 on configs/diblock-symmetric-chiN15 (README).
     */
    initial: lossWeight(100),
    /** (φ_A + φ_B − 1)², mean over the x grid. */
    incompressibility: lossWeight(1),
    /** (w_A − w_B − χN(φ_B − φ_A))², mean over the x grid. */
    selfConsistency: lossWeight(1),
    /** (mean of (w_A + w_B)/2)²: pins the pressure gauge. */
    gauge: lossWeight(1),
  })
  .strict();

/** Contour steps per block of a quadrature of φ: even, for Simpson's rule. */
const simpsonNodesPerBlock = z
  .number()
  .int()
  .min(4)
  .max(256)
  .refine((n) => n % 2 === 0, { message: "must be even (Simpson's rule for φ)" });

export const trainConfigSchema = z
  .object({
    version: configVersionSchema,
    kind: z.literal('train'),
    system: systemSchema,
    cell: cellSchema.prefault({}),
    /** Settings of the spectral reference solved for the warm start and the evaluation. */
    solver: spectralSchema.prefault({}),
    backend: z.enum(['auto', 'native', 'wasm', 'cpu']).default('auto'),
    networks: z
      .object({
        field: fieldNetworkSchema.prefault({}),
        propagator: propagatorNetworkSchema.prefault({}),
        /** Use one propagator network for q and q† when the chain reads the same from both ends. */
        shareWhenPalindromic: z.boolean().default(true),
      })
      .strict()
      .prefault({}),
    collocation: z
      .object({
        /** Fixed tensor grid: x points, and contour nodes per block (even: Simpson's rule for φ). */
        nx: z
          .number()
          .int()
          .min(8)
          .max(512)
          .refine((n) => n % 2 === 0, { message: 'must be even (the grid of the periodic cell; its Fourier interpolant needs an even count)' })
          .meta({ constraint: 'even' })
          .default(32),
        nodesPerBlock: z
          .number()
          .int()
          .min(4)
          .max(512)
          .refine((n) => n % 2 === 0, { message: 'must be even (Simpson intervals come in pairs)' })
          .meta({ constraint: 'even' })
          .default(16),
        /**
         * How the contour steps are spread over the blocks: 'equal' (nodesPerBlock on every
         * block) or 'by-length' (nodesPerBlock × blocks in all, in proportion to the blocks'
         * lengths, each even: every block nearly the same step). Applies to every grid the
         * networks are trained on (the tensor grid, the second-order phase's).
         */
        contourSpread: z.enum(['equal', 'by-length']).default('equal'),
        /** Extra MDE collocation points, redrawn every resampleEvery steps. */
        random: z.number().int().min(0).max(100000).default(256),
        /** Of those, the share drawn where the MDE residual is largest (residual-based). */
        residualShare: z.number().min(0).max(1).default(0.5),
        resampleEvery: z.number().int().min(1).default(250),
        seed: z.number().int().min(0).max(0xffffffff).default(7),
      })
      .strict()
      .prefault({}),
    losses: z
      .object({
        weights: lossWeightsSchema.prefault({}),
        /**
         * 'fixed': the weights above. 'gradient-statistics': learning-rate annealing of
         * Wang, Teng & Perdikaris (SIAM J. Sci. Comput. 43, A3055, 2021) on top of them.
         */
        balancing: z.enum(['fixed', 'gradient-statistics']).default('fixed'),
        /**
         * 'detached': the MDE residual sees the field network's w as fixed, so the MDE term
         * trains the propagators only and the fields answer to the field equations alone
         * (as in an SCFT iteration). 'coupled': the MDE gradient also moves the fields.
         */
        fieldInMde: z.enum(['detached', 'coupled']).default('detached'),
        balanceEvery: z.number().int().min(1).default(100),
        balanceSmoothing: z.number().gt(0).lte(1).default(0.1),
      })
      .strict()
      .prefault({}),
    warmStart: z
      .object({
        /** 'reference': fit the networks to the spectral solution before physics training. */
        type: z.enum(['reference', 'none']).default('reference'),
        fitPropagator: z.boolean().default(true),
        /** Adam steps of the fit to the reference. */
        adamSteps: z.number().int().min(0).max(100000).default(400),
        learningRate: z.number().gt(0).lt(1).default(3e-3),
      })
      .strict()
      .prefault({}),
    /** Transfer: start from a checkpoint trained at other parameters (weights must match). */
    initFrom: z.string().min(1).optional(),
    training: z
      .object({
        /**
         * 'alternating': the MDE term trains the propagators in the current fields, and
         * every fieldUpdateEvery steps the field network is refitted to the SCFT field update
         * w + λ·d of physics/scft-equations.ts computed from the networks' own φ (an SCFT
         * iteration whose propagator solve is the network). 'joint': one weighted loss of all
         * terms trains every network at once.
         */
        strategy: z.enum(['alternating', 'joint']).default('alternating'),
        fieldUpdateEvery: z.number().int().min(1).default(100),
        fieldMixing: z.number().gt(0).lte(1).default(0.5),
        fieldFitSteps: z.number().int().min(1).default(150),
        fieldFitLearningRate: z.number().gt(0).lt(1).default(5e-4),
        /** Adam steps of physics training (then lbfgsIterations of L-BFGS). */
        adamSteps: z.number().int().min(0).max(1000000).default(1500),
        learningRate: z.number().gt(0).lt(1).default(2e-3),
        /** lr(step) = learningRate · decay^(step/decaySteps). */
        decay: z.number().gt(0).lte(1).default(0.5),
        decaySteps: z.number().int().min(1).default(1000),
        /** L-BFGS polish iterations after Adam (0: none). */
        lbfgsIterations: z.number().int().min(0).max(10000).default(0),
        /** Alternating strategy: split the polish into this many (field update, L-BFGS) cycles. */
        lbfgsCycles: z.number().int().min(1).max(100).default(4),
        logEvery: z.number().int().min(1).default(50),
        checkpointEvery: z.number().int().min(1).default(250),
        /** Stop as diverged when the loss exceeds this multiple of the best loss so far. */
        divergenceFactor: z.number().gt(1).default(1e4),
        /**
         * Second-order phase after Adam and L-BFGS: Levenberg–Marquardt iterations on the whole
         * SCFT residual system in float64 (the MDE of every propagator, incompressibility,
         * self-consistency and gauge; the field network trains jointly). 0: none.
         */
        secondOrderIterations: z.number().int().min(0).max(100000).default(0),
        secondOrder: z
          .object({
            /** Cell grid points of the phase's residuals (default: collocation.nx). */
            nx: z
              .number()
              .int()
              .min(8)
              .max(256)
              .refine((n) => n % 2 === 0, { message: 'must be even (the grid of the periodic cell)' })
              .optional(),
            /** Contour steps per block of the phase's residuals (default: collocation.nodesPerBlock). */
            nodesPerBlock: simpsonNodesPerBlock.optional(),
            /**
             * 'alternating': cycles of (field-network refit to the SCFT update, then LM on each
             * propagator's MDE in those fields, one normal matrix per propagator); 'joint': LM on
             * the whole system with the field network's parameters among the unknowns.
             */
            strategy: z.enum(['alternating', 'joint']).default('alternating'),
            /** Alternating: the iterations are split over this many cycles. */
            cycles: z.number().int().min(1).max(100).default(4),
            /**
             * Alternating: the field step between cycles, on the phase's grid: 'anderson' mixing
             * over the cycles' fields and SCFT deviations, or 'simple' mixing w + λ d (λ:
             * training.fieldMixing); the field network is then refitted to the new fields.
             */
            fieldStep: z.enum(['anderson', 'simple']).default('anderson'),
            /** Alternating with the Anderson field step: earlier cycles it keeps. */
            andersonHistory: z.number().int().min(1).max(50).default(8),
            /**
             * Alternating: the k-th field step moves the fields by fieldStepDecay^(k−1) of the
             * move its rule asks for (1: the whole move), so the propagators' error in the
             * networks' SCFT deviation moves converged fields less and less.
             */
            fieldStepDecay: z.number().gt(0).lte(1).default(1),
            /**
             * Alternating: LM iterations of each propagator in the first cycle, before the
             * first field step (0: the same share of secondOrderIterations as every cycle);
             * the other cycles share what is left.
             */
            firstCycleIterations: z.number().int().min(0).max(100000).default(0),
            /**
             * Alternating, with firstCycleIterations: a propagator's first cycle ends early once
             * its MDE loss fell by less than this fraction over its last 5 LM iterations (0:
             * never); the later cycles share the iterations saved.
             */
            firstCyclePlateau: z.number().min(0).lt(1).default(0),
            /**
             * Alternating: contour steps per block of the φ the field steps read (the networks
             * evaluated there, values only; default nodesPerBlock). Even.
             */
            stateNodesPerBlock: simpsonNodesPerBlock.optional(),
            /**
             * Alternating: before each propagator's LM in a cycle, this many LM iterations on
             * its networks' output layers alone (the hidden layers held; a small normal matrix).
             * 0: none.
             */
            outputLayerIterations: z.number().int().min(0).max(1000).default(0),
            /**
             * Extra steps per accepted LM step of a propagator, with the same damped normal
             * matrix and Jacobian (Fan's modified Levenberg–Marquardt): each costs two residual
             * evaluations and two triangular solves, not a new normal matrix. 0: none.
             */
            extraSteps: z.number().int().min(0).max(10).default(0),
            /** Alternating: joint iterations after the cycles (on top of secondOrderIterations), field network included. */
            jointIterations: z.number().int().min(0).max(100000).default(0),
            /** Damping μD of the normal equations: D = diag(JᵀJ) ('marquardt') or I ('identity'). */
            damping: z.enum(['marquardt', 'identity']).default('marquardt'),
            /** Measure φ_A against the reference every this many iterations (0: at the end only); the best state is kept. */
            evaluateEvery: z.number().int().min(0).default(5),
            /** Stop once the loss (Σ r², the weighted terms) is below this. */
            lossTolerance: z.number().min(0).default(0),
          })
          .strict()
          .prefault({}),
        /** Evaluate φ_A error against the reference every this many steps (0: only at the end). */
        evaluateEvery: z.number().int().min(0).default(0),
        /**
         * Stop early once φ_A relative L2 error is below this (needs evaluateEvery > 0). It is also
         * the run's verdict: a run that ends above it is reported as such, and `train` exits 3.
         */
        targetPhiError: z.number().gt(0).optional(),
        /**
         * With initFrom: 'warm-start' also trains this config from a warm start on the
         * reference (no initFrom) up to targetPhiError and reports the steps and seconds the
         * transfer saved. Needs initFrom, targetPhiError and evaluateEvery > 0.
         */
        transferBaseline: z.enum(['warm-start', 'none']).default('none'),
      })
      .strict()
      .prefault({}),
  })
  .strict();

export type TrainConfig = z.infer<typeof trainConfigSchema>;
export type TrainConfigInput = z.input<typeof trainConfigSchema>;

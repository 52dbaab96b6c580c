/**
 * The named terms of the physics-informed loss, each a scalar built from the equations in
 * the files beside this one (docs/physics.md). Units: x in Rg, s ∈ [0, 1], w in kT per chain.
 *
 *   mde               mean over every collocation point of both propagators of r²,
 *                     r = ∂u/∂s − D(∂²u/∂x² + (∂u/∂x)²) + w, u = ln q   (mde-residual.ts)
 *   periodicity       ½ (P[ln q] + P[ln q†]), P the end-to-end mismatch  (periodicity.ts)
 *   initial           mean of u(x, 0)² over the x grid, q and q† together (initial-condition.ts)
 *   incompressibility mean (φ_A + φ_B − 1)²                                (field-equations.ts)
 *   selfConsistency   mean (w_A − w_B − χN (φ_B − φ_A))² / max(1, χN)²   (field-equations.ts)
 *   gauge             (mean (w_A + w_B)/2)² / max(1, χN)²                  (field-equations.ts)
 * with φ from the grid propagators (densities.ts). A one-species melt keeps
 * incompressibility (φ_K − 1)² and the gauge mean w_K = 0; its selfConsistency is 0.
 */
// The term names are also the keys of the checkpoint and metrics files: defined with that format.
import { LOSS_TERMS } from '../../io/formats/training.js';
import type { LossTerm } from '../../io/formats/training.js';
import type * as TfModule from '@tensorflow/tfjs';
import type { Jet } from '../../autodiff/jet.js';
import type { Tf } from '../../autodiff/tf.js';
import type { Species } from '../../physics/chain-schema.js';
import type { GridDensities } from './densities.js';
import { gaugeLoss, incompressibilityLoss, selfConsistencyLoss } from './field-equations.js';
import { initialConditionLoss } from './initial-condition.js';
import { periodicityLoss } from './periodicity.js';

type Scalar = TfModule.Scalar;
type Tensor = TfModule.Tensor;

export { LOSS_TERMS };
export type { LossTerm };
/** The terms of the propagator networks alone: what the alternating strategy trains on. */
export const PROPAGATOR_TERMS: readonly LossTerm[] = ['mde', 'periodicity', 'initial'];
export type LossValues = Record<LossTerm, number>;
export type LossTensors = Record<LossTerm, Scalar>;
export type FieldEquationTerms = Pick<LossTensors, 'incompressibility' | 'selfConsistency' | 'gauge'>;

/** mde: the mean of r² over all the residuals given (each any shape). */
export function mdeTerm(tf: Tf, residuals: Tensor[]): Scalar {
  return tf.mean(tf.concat(residuals.map((r) => tf.reshape(tf.square(r), [-1])), 0)) as Scalar;
}

/** periodicity: u = ln q and ln q† at the ends x = 0 then x = L (rows as periodicity.ts reads them). */
export function periodicityTerm(tf: Tf, uq: Jet, uqDagger: Jet): Scalar {
  return tf.mul(tf.add(periodicityLoss(tf, uq), periodicityLoss(tf, uqDagger)), 0.5) as Scalar;
}

/** initial: u(x, 0) of q and of q† on the x grid. */
export function initialTerm(tf: Tf, uq0: Tensor, uqDagger0: Tensor): Scalar {
  return initialConditionLoss(tf, tf.concat([uq0, uqDagger0], 0));
}

/**
 * The field equations on the x grid from the grid densities and the field network's w_A,
 * w_B ([1, nx] each); `species` are those of the chain (one or two).
 */
export function fieldEquationTerms(tf: Tf, species: readonly Species[], chiN: number, dens: GridDensities, wA: Tensor, wB: Tensor, zero: Scalar, surfaceField: Tensor | null = null): FieldEquationTerms {
  if (species.length === 1) {
    const only = species[0];
    const phi = only === 'A' ? dens.phiA : dens.phiB;
    return { incompressibility: incompressibilityLoss(tf, phi, null), selfConsistency: zero, gauge: gaugeLoss(tf, 0, only === 'A' ? wA : wB, null) };
  }
  return {
    incompressibility: incompressibilityLoss(tf, dens.phiA, dens.phiB),
    selfConsistency: selfConsistencyLoss(tf, chiN, wA, wB, dens.phiA, dens.phiB, surfaceField),
    gauge: gaugeLoss(tf, chiN, wA, wB),
  };
}

/** Σ_k weight_k · term_k, in the order of LOSS_TERMS (mde first). */
export function weightedTotal(tf: Tf, parts: LossTensors, weights: LossValues): Scalar {
  let total = tf.mul(parts.mde, weights.mde) as Scalar;
  for (const k of LOSS_TERMS) if (k !== 'mde') total = tf.add(total, tf.mul(parts[k], weights[k])) as Scalar;
  return total;
}

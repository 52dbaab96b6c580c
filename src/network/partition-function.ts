/**
 * Q of approximate propagators (a network's), corrected by their own MDE residual: the
 * adjoint (dual-weighted residual) correction of an output functional (M. B. Giles and
 * E. Süli, "Adjoint methods for PDEs: a posteriori error analysis and postprocessing by
 * duality", Acta Numerica 11, 2002).
 *
 * Why: Q = ⟨q(·, 1)⟩ read off the end of an approximate q carries the MDE residual
 * integrated over the whole contour, first order in it, and F = −ln Q + … inherits it
 * (measured: the network's F error several times its φ_A error). With the q-form residual
 * R = ∂q̃/∂s − D ∂²q̃/∂x² + w q̃ = q̃ r (r the residual of u = ln q̃, losses/mde-residual.ts)
 * and the exact q† (which solves the adjoint MDE; the diffusion operator is self-adjoint in
 * a periodic cell and with the film's zero-slope walls),
 *   d/ds ⟨q†(·, 1 − s) q̃(·, s)⟩ = ⟨q†(·, 1 − s) R(·, s)⟩,   so
 *   Q = ⟨q̃(·, 1)⟩ − ∫₀¹ ⟨q†(·, 1 − s) q̃(·, s) r(·, s)⟩ ds
 * exactly (q̃(·, 0) = q†(·, 0) = 1). With the network's own q̃† in place of q† the error is
 * the product of the two propagators' errors (second order). The same holds from the other
 * end with the roles swapped (the estimate "from q†").
 *
 * Units: s ∈ [0, 1]; ⟨·⟩ the cell's mean; r in kT per chain (as w). The contour integral is
 * Simpson's rule on each block's own nodes (r jumps at a junction: each block its own D, w).
 */
import type { Contour } from '../physics/contour.js';

export interface SideWithResidual {
  contour: Contour;
  /** ln q on the contour nodes (rows) × grid. */
  logQ: Float64Array[];
  /** Per block, r at that block's nodes × grid (row-major, (steps + 1) · nx). */
  residual: Float64Array[];
}

/** ⟨q̃(1)⟩ − ∫⟨q̃' q̃ r⟩ ds for one side `a` with the other side `b` as the adjoint weight. */
function correctedFromEnd(a: SideWithResidual, b: SideWithResidual, mean: (u: Float64Array) => number): { end: number; corrected: number } {
  const ns = a.contour.ns;
  const nx = a.logQ[0].length;
  const end = mean(a.logQ[ns].map(Math.exp));
  const integrand = new Float64Array(nx);
  let correction = 0;
  a.contour.blocks.forEach((block, k) => {
    const r = a.residual[k];
    for (let i = 0; i <= block.steps; i++) {
      const node = block.offset + i;
      const weight = ((i === 0 || i === block.steps ? 1 : i % 2 === 1 ? 4 : 2) * block.h) / 3;
      const ua = a.logQ[node];
      const ub = b.logQ[ns - node];
      for (let j = 0; j < nx; j++) integrand[j] = Math.exp(ua[j] + ub[j]) * r[i * nx + j];
      correction += weight * mean(integrand);
    }
  });
  return { end, corrected: end - correction };
}

export interface CorrectedPartitionFunction {
  /** ⟨q̃(·, 1)⟩ and ⟨q̃†(·, 1)⟩ as read off the ends. */
  endQ: number;
  endQDagger: number;
  /** The two corrected estimates (from q's end and from q†'s end). */
  fromQ: number;
  fromQDagger: number;
}

/** Q of the pair (q̃ on the chain, q̃† on the reversed chain) with the adjoint correction from both ends. */
export function correctedPartitionFunction(q: SideWithResidual, qDagger: SideWithResidual, mean: (u: Float64Array) => number): CorrectedPartitionFunction {
  const a = correctedFromEnd(q, qDagger, mean);
  const b = correctedFromEnd(qDagger, q, mean);
  return { endQ: a.end, endQDagger: b.end, fromQ: a.corrected, fromQDagger: b.corrected };
}

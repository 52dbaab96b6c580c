/**
 * dF/dL of a converged lamella, for finding the stress-free (equilibrium) period with a
 * few solves instead of a full minimisation of F(L).
 *
 * At a self-consistent solution F is stationary in the fields, so the total derivative of
 * F along the family of solutions equals the partial derivative at fixed fields. Holding the
 * grid values w_j fixed (fields fixed in the scaled coordinate x/L), only the chain term of
 * F = −ln Q + (1/L)∫[χN φ_A φ_B − w_A φ_A − w_B φ_B] dx depends on L: the interaction
 * integral is a grid mean that does not change. So dF/dL = −d ln Q/dL at fixed w_j,
 * taken here by a central difference of two single-chain solves (no SCF iteration).
 * (The stationarity holds up to the contour discretisation error, O(ds⁴) with Richardson.)
 */
import type { Chain, ContourGrid } from '../physics/chain.js';
import type { SpeciesArrays } from '../physics/fields.js';
import { PropagatorSolver } from '../spectral/propagator-solver.js';

export function periodStress(chain: Chain, contour: ContourGrid, length: number, w: SpeciesArrays, relStep = 1e-4): number {
  const nx = w.A.length;
  const eps = relStep * length;
  const lnQ = (L: number) => {
    const solver = new PropagatorSolver(chain, { length: L, nx }, contour);
    solver.setFields(w);
    return Math.log(solver.solve().Q);
  };
  return -(lnQ(length + eps) - lnQ(length - eps)) / (2 * eps);
}

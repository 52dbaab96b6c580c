/**
 * dF/dL of a converged solution in a periodic cell: the stress whose zero is the
 * equilibrium (stress-free) cell length.
 *
 * Units: L in Rg, F in kT per chain, so dF/dL in kT per chain per Rg.
 * At a self-consistent solution F is stationary in the fields, so the total derivative of F
 * along the family of solutions equals the partial derivative at fixed fields. Holding the
 * grid values w_j fixed (fields fixed in the scaled coordinate x/L), only the chain term of
 * F = −ln Q + ⟨χN φ_A φ_B − w_A φ_A − w_B φ_B⟩ depends on L: the interaction average is a grid
 * mean that does not change. So dF/dL = −d ln Q/dL at fixed w_j, taken here by a central
 * difference of two single-chain solves (no SCF iteration). The stationarity holds up to the
 * contour discretisation error, O(h⁴) with Richardson (common practice, no source).
 */
import type { Chain } from '../physics/chain.js';
import type { Cell } from '../physics/cell/cell.js';
import type { Contour } from '../physics/contour.js';
import type { SpeciesArrays } from '../physics/fields.js';
import { PropagatorSolver } from './propagator-solver.js';

export function cellStress(chain: Chain, contour: Contour, cell: Cell, w: SpeciesArrays, relStep = 1e-4): number {
  const eps = relStep * cell.length;
  const lnQ = (L: number) => {
    const solver = new PropagatorSolver(chain, cell.withLength(L), contour);
    solver.setFields(w);
    return Math.log(solver.solve().Q);
  };
  return -(lnQ(cell.length + eps) - lnQ(cell.length - eps)) / (2 * eps);
}

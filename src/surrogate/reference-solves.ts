/**
 * Reference solves of a surrogate (anchors, extra fit data, held-out points): the library's
 * spectral solve (solveFromConfig) of the point's system, one period per cell, at the
 * equilibrium period or at a given one. Units: lengths in Rg, F in kT per chain.
 *
 * Phase: every solution comes in the one phase convention of physics/phase-convention.ts
 * (an A-domain centre at x = 0), so the network learns one smooth family and profiles are
 * compared like with like.
 */
import { InputError, RunFailure } from '../io/errors.js';
import type { SurrogateConfig } from '../io/schemas/surrogate-config.js';
import type { SpeciesArrays } from '../physics/fields.js';
import type { ScftSolution } from '../physics/result.js';
import { solveFromConfig } from '../spectral/solve-from-config.js';
import type { ParameterPoint, ParameterSpace } from './parameter-space.js';

export function solveReference(space: ParameterSpace, config: SurrogateConfig, p: ParameterPoint, opts: { period?: number; initial?: SpeciesArrays; role: string }): ScftSolution {
  const cell = { kind: 'periodic' as const, period: opts.period ?? ('equilibrium' as const), periods: 1, nx: config.cell.nx, ns: config.cell.ns };
  let solution: ScftSolution;
  try {
    solution = solveFromConfig({ system: space.system(p), cell, solver: config.solver, output: { propagators: false } }, { initial: opts.initial }).solution;
  } catch (e) {
    // The period search gives up with a RunFailure (a trial that does not converge): say where.
    if (e instanceof RunFailure) throw new RunFailure(`reference solve at the ${opts.role} ${space.describe(p)} failed: ${e.message}`);
    throw e;
  }
  if (!solution.converged) throw new InputError(`reference: the spectral solve at the ${opts.role} ${space.describe(p)} did not converge (${solution.notes.join('; ')}); adjust the reference settings or the parameter range`);
  if (solution.phase !== 'lamellar') {
    throw new InputError(`parameters: the reference is ${solution.phase} at the ${opts.role} ${space.describe(p)} (no lamella to learn); allowed: ranges where the melt is ordered (above the order–disorder transition; see mesofield spinodal)`);
  }
  return solution;
}

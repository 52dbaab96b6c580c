/**
 * Reference solves of a surrogate (anchors, extra fit data, held-out points): the library's
 * spectral solve (solveFromConfig) of the point's system, one period per cell, at the
 * equilibrium period or at a given one. Units: lengths in Rg, F in kT per chain.
 *
 * Phase: from the configured (mirror-symmetric) start every solution is even about x = 0,
 * but whether an A or a B domain sits at x = 0 depends on the path of the iteration and
 * the period search (at f = 0.5 both occur within χN ∈ [12, 20]). The two differ by half a
 * period, so each solution is rolled by nx/2 when needed to put the A domain at x = 0
 * (mode 1 of φ_A with a positive cosine coefficient): the network then learns one smooth
 * family, and profiles are compared like with like (common practice, no source).
 */
import { InputError, RunFailure } from '../io/errors.js';
import type { SurrogateConfig } from '../io/schemas/surrogate-config.js';
import type { SpeciesArrays } from '../physics/fields.js';
import type { ScftSolution } from '../physics/result.js';
import { modePhase } from '../physics/translation.js';
import { solveFromConfig } from '../spectral/solve-from-config.js';
import type { ParameterPoint, ParameterSpace } from './parameter-space.js';

/** The solution moved by half a period when its A domain is not at x = 0 (see header). */
export function canonicalPhase(sol: ScftSolution): ScftSolution {
  const nx = sol.nx;
  // A non-negative cosine coefficient of mode 1 is a phase within ±π/2.
  if (Math.abs(modePhase(sol.phi.A, 1).phase) <= Math.PI / 2 || nx % 2 !== 0) return sol;
  const roll = (a: Float64Array) => Float64Array.from(a, (_, j) => a[(j + nx / 2) % nx]);
  const both = (u: SpeciesArrays) => ({ A: roll(u.A), B: roll(u.B) });
  return { ...sol, phi: both(sol.phi), w: both(sol.w), notes: [...sol.notes, 'rolled by half a period to put the A domain at x = 0'] };
}

export function solveReference(space: ParameterSpace, config: SurrogateConfig, p: ParameterPoint, opts: { period?: number; initial?: SpeciesArrays; role: string }): ScftSolution {
  const cell = { kind: 'periodic' as const, period: opts.period ?? ('optimize' as const), periods: 1, nx: config.cell.nx, ns: config.cell.ns };
  let solution: ScftSolution;
  try {
    solution = solveFromConfig({ system: space.system(p), cell, solver: config.reference, output: { propagators: false } }, { initial: opts.initial }).solution;
  } catch (e) {
    // The period search gives up with a plain Error (a trial that does not converge, no bracket): a failed run, not bad input.
    if (e instanceof Error && e.constructor === Error) throw new RunFailure(`reference solve at the ${opts.role} ${space.describe(p)} failed: ${e.message}`);
    throw e;
  }
  if (!solution.converged) throw new InputError(`reference: the spectral solve at the ${opts.role} ${space.describe(p)} did not converge (${solution.notes.join('; ')}); adjust the reference settings or the parameter range`);
  if (solution.phase !== 'lamellar') {
    throw new InputError(`parameters: the reference is ${solution.phase} at the ${opts.role} ${space.describe(p)} (no lamella to learn); allowed: ranges where the melt is ordered (above the order–disorder transition; see mesofield spinodal)`);
  }
  return canonicalPhase(solution);
}

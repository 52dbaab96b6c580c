/**
 * The one builder of the solution record (physics/result.ts) and the one phase verdict, used
 * by the spectral reference, the networks and the surrogate alike: from fields and densities
 * in a cell it forms F (physics/scft-equations.ts), the verdict and the order parameter, and
 * puts the lamella in the phase convention (physics/phase-convention.ts).
 *
 * Units: fields and free energies in kT per chain, lengths in Rg.
 */
import type { SystemSpec } from './chain-schema.js';
import type { Chain } from './chain.js';
import { disorderedFreeEnergy } from './chain.js';
import type { Cell } from './cell/cell.js';
import type { Contour } from './contour.js';
import type { SpeciesArrays } from './fields.js';
import { inConvention } from './phase-convention.js';
import type { Phase, Propagators, ScftSolution } from './result.js';
import { fieldFormFreeEnergy, freeEnergy } from './scft-equations.js';

/**
 * How flat φ_A must be to call a melt disordered, by the precision of the solver that made it:
 * the spectral reference converges to 1e-9 kT, so a spread of 1e-5 is no lamella; a network's
 * φ_A is accurate to ~1e-3, so below 0.02 it is called disordered (even near the transition a
 * converged lamella has a much larger spread: 0.2 at χN = 10.6, f = 0.5; tests/spectral).
 */
export const DISORDER_SPREAD = { spectral: 1e-5, network: 0.02 } as const;

/** max u − min u: the spread of a grid function (the order parameter of the verdict). */
export function spreadOf(u: ArrayLike<number>): number {
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < u.length; i++) {
    lo = Math.min(lo, u[i]);
    hi = Math.max(hi, u[i]);
  }
  return hi - lo;
}

/** The verdict on densities: single chain in prescribed fields, a one-species melt, or lamellar unless φ_A is flat. */
export function phaseVerdict(chain: Chain, phi: SpeciesArrays, threshold: number, prescribedFields: boolean): Phase {
  if (prescribedFields) return 'single-chain';
  if (chain.species.length === 1) return 'homogeneous-melt';
  return spreadOf(phi.A) < threshold ? 'disordered' : 'lamellar';
}

export interface SolutionParts {
  solver: ScftSolution['solver'];
  system: SystemSpec;
  chain: Chain;
  cell: Cell;
  contour: Contour;
  w: SpeciesArrays;
  phi: SpeciesArrays;
  Q: number;
  QDagger: number;
  /** The fields were prescribed (a single chain, no self-consistency): F = −ln Q. */
  prescribedFields: boolean;
  iterations: number;
  residual: number;
  converged: boolean;
  seconds: number;
  notes: string[];
  propagators?: Propagators;
  /** The verdict's threshold on the spread of φ_A (DISORDER_SPREAD). */
  disorderSpread: number;
  /** A verdict the caller already reached (a diverged iteration); default: phaseVerdict. */
  phase?: Phase;
  /**
   * Put the lamella in the phase convention (default). Off only for a solver's internal view
   * of its own iterate (a network's field update must see the fields where its propagators are).
   */
  placeInConvention?: boolean;
  /**
   * Which form of F (physics/scft-equations.ts): 'densities' (default: freeEnergy, from φ and
   * w) or 'fields' (fieldFormFreeEnergy: from w and Q alone, stationary in w; for densities
   * that carry an approximation error of their own, with an adjoint-corrected Q).
   */
  freeEnergyForm?: 'densities' | 'fields';
}

function freeEnergyOf(p: SolutionParts): number {
  if (p.prescribedFields) return -Math.log(p.Q);
  const plain = () => freeEnergy(p.cell, p.system.chiN, p.Q, p.w, p.phi);
  return p.freeEnergyForm === 'fields' ? (fieldFormFreeEnergy(p.chain, p.cell, p.system.chiN, p.Q, p.w) ?? plain()) : plain();
}

export function buildSolution(p: SolutionParts): ScftSolution {
  const chiN = p.system.chiN;
  const phase = p.phase ?? phaseVerdict(p.chain, p.phi, p.disorderSpread, p.prescribedFields);
  const placed = phase === 'lamellar' && p.placeInConvention !== false ? inConvention(p.cell, { phi: p.phi, w: p.w, propagators: p.propagators }) : p;
  return {
    solver: p.solver,
    system: p.system,
    cell: p.cell,
    contour: p.contour,
    length: p.cell.length,
    periods: p.cell.periods,
    period: p.cell.periods > 0 ? p.cell.length / p.cell.periods : Number.NaN,
    nx: p.cell.n,
    ns: p.contour.ns,
    x: p.cell.x,
    phi: placed.phi,
    w: placed.w,
    Q: p.Q,
    QDagger: p.QDagger,
    freeEnergy: freeEnergyOf(p),
    freeEnergyDisordered: p.prescribedFields ? Number.NaN : disorderedFreeEnergy(p.chain, chiN),
    phase,
    amplitude: spreadOf(p.phi.A),
    iterations: p.iterations,
    residual: p.residual,
    converged: p.converged,
    seconds: p.seconds,
    propagators: placed.propagators,
    notes: p.notes,
  };
}

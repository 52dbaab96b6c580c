/**
 * The one result type every solver returns (spectral reference and network alike),
 * so that evaluation, inversion and reports never care which solver made it.
 */
import type { SystemSpec } from './chain-schema.js';
import type { SpeciesArrays } from './fields.js';

export type Phase = 'lamellar' | 'disordered' | 'homogeneous-melt' | 'single-chain';

export interface Propagators {
  /** Contour points s_i = i/ns, i = 0..ns. */
  s: Float64Array;
  /** q[i] is q(x, s_i) on the grid. */
  q: Float64Array[];
  /** qDagger[i] is q†(x, s_i). */
  qDagger: Float64Array[];
}

export interface ScftSolution {
  solver: 'spectral' | 'network';
  system: SystemSpec;
  /** Cell length L in Rg. */
  length: number;
  /** Lamellar periods in the cell (the cell was set up with this many). */
  periods: number;
  /** Lamellar period L / periods, in Rg. */
  period: number;
  nx: number;
  ns: number;
  x: Float64Array;
  phi: SpeciesArrays;
  w: SpeciesArrays;
  /** Single-chain partition function from q and from q† (equal at convergence). */
  Q: number;
  QDagger: number;
  /** Free energy per chain in kT. */
  freeEnergy: number;
  freeEnergyDisordered: number;
  phase: Phase;
  /** max φ_A − min φ_A: the order parameter used for the phase verdict. */
  amplitude: number;
  iterations: number;
  residual: number;
  converged: boolean;
  seconds: number;
  propagators?: Propagators;
  notes: string[];
}

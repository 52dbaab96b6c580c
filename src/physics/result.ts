/**
 * The one result type every solver returns (spectral reference and network alike),
 * so that evaluation, inversion and reports never care which solver made it.
 */
import type { SystemSpec } from './chain-schema.js';
import type { Cell } from './cell/cell.js';
import type { Contour } from './contour.js';
import type { SpeciesArrays } from './fields.js';

export type Phase = 'lamellar' | 'disordered' | 'homogeneous-melt' | 'single-chain';

export interface Propagators {
  /** Contour nodes s_i, i = 0..ns (physics/contour.ts). */
  s: Float64Array;
  /** q[i] is q(x, s_i) on the grid. */
  q: Float64Array[];
  /** qDagger[i] is q†(x, s'_i) on the reversed chain's nodes (s'_{ns−i} = 1 − s_i). */
  qDagger: Float64Array[];
}

export interface ScftSolution {
  solver: 'spectral' | 'network' | 'surrogate';
  system: SystemSpec;
  /** The cell the solution lives in (its grid is `x`). */
  cell: Cell;
  /** The contour of the densities' quadrature (the spectral steps, or a network's evaluation nodes). */
  contour: Contour;
  /** Cell length L in Rg (cell.length). */
  length: number;
  /** Lamellar periods in the cell (cell.periods; 0 for a film). */
  periods: number;
  /** Lamellar period L / periods, in Rg (NaN when the cell does not fix it). */
  period: number;
  /** Grid points (cell.n) and contour steps (contour.ns). */
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

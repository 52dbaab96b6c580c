/**
 * The field step of 'alternating' training: an SCFT iteration whose propagator solve is
 * the network. From the networks' own φ on the collocation x grid (float64 quadrature,
 * network-solution.ts) the deviation d of physics/scft-equations.ts gives the simple-
 * mixing update w' = w + λ d (gauge fixed), and the field network is refitted to w'.
 */
import type { SystemSpec } from '../physics/chain-schema.js';
import type { SpeciesArrays } from '../physics/fields.js';
import { fieldDeviation, fixGauge } from '../physics/scft-equations.js';
import type { Tf } from './backend.js';
import { networkSolution } from './network-solution.js';
import type { ScftNetworks } from './scft-networks.js';
import { warmStart } from './warm-start.js';

export interface FieldUpdateResult {
  /** max |d| before the update (kT): the SCFT residual of the networks. */
  residual: number;
  fitLoss: number;
}

/**
 * Refit the field network to w' = w + λ d(w, φ) (gauge fixed), for fields w on the grid x and
 * the densities φ that answer them; shared by the forward step below and the inverse estimator.
 */
export function refitFieldsToUpdate(tf: Tf, nets: ScftNetworks, chiN: number, x: Float64Array, w: SpeciesArrays, phi: SpeciesArrays, mixing: number, fitSteps: number, learningRate: number): FieldUpdateResult {
  if (!nets.field) return { residual: 0, fitLoss: 0 };
  const { deviation, residual } = fieldDeviation(nets.chain, chiN, w, phi);
  const target = { A: Float64Array.from(w.A), B: Float64Array.from(w.B) };
  for (const k of nets.chain.species) for (let j = 0; j < x.length; j++) target[k][j] += mixing * deviation[k][j];
  fixGauge(nets.chain, target);
  const fit = warmStart(tf, nets, { x, w: target, chiN }, fitSteps, learningRate, undefined, nets.field.parameters);
  return { residual, fitLoss: fit.finalLoss };
}

export function updateFieldNetwork(tf: Tf, nets: ScftNetworks, system: SystemSpec, nx: number, nodesPerBlock: number, mixing: number, fitSteps: number, learningRate: number): FieldUpdateResult {
  if (!nets.field) return { residual: 0, fitLoss: 0 };
  const sol = networkSolution(tf, nets, system, { periods: 1, nx, nodesPerBlock });
  return refitFieldsToUpdate(tf, nets, system.chiN, sol.x, sol.w, sol.phi, mixing, fitSteps, learningRate);
}

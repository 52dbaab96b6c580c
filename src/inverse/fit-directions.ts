/**
 * The directions in data space along which the classical fit can move its model profile at
 * its estimate: ∂φ_model(x_i)/∂β for each fitted parameter β, at the data positions.
 *
 *   offset x0:  φ(x_i − x0)               → −φ′(x_i − x0)
 *   χN:         at the held period (period mode "given" or "free"), or along the stress-free
 *               period L_eq(χN) (mode "equilibrium": the lamella's shape and period move together)
 *   period L:   mode "free" only, at fixed χN (the solution re-solved in the stretched cell)
 *
 * At the weighted least-squares minimum the residual is orthogonal (in the 1/σ² metric) to
 * every one of these (the normal equations of the fit, Gauss–Newton's stationarity condition;
 * Nocedal & Wright, "Numerical Optimization", 2nd ed., §10.3). The network estimator's data
 * rows use them (network-least-squares.ts, DataRows.split): the part of the data outside
 * their span is what no lamella of the model moves towards near the estimate, noise by the
 * fit's own account.
 *
 * The χN and period derivatives are central differences of spectral solves (the classical
 * model, inverse/lamella-model.ts) with steps h_χ = 1e-3 χN and h_L = 1e-3 L: the profiles
 * are smooth in both, so the truncation error is O(h²) ≈ 1e-6 relative, and the solves
 * converge far below h·|∂φ/∂β| (their last field change is about 1e-9 kT at the default
 * tolerance: the demo's reference solve reports 8.3e-10). The offset derivative is the
 * interpolant's, by central differences with h = 1e-6 L (a trigonometric polynomial: the
 * error is round-off).
 *
 * Units: x, x0 and L in Rg; χN in kT per chain; directions in φ per unit of the parameter.
 */
import type { ChainSpec } from '../physics/chain-schema.js';
import type { FourierSeries } from '../physics/cell/fourier-series.js';
import { LamellaModel } from './lamella-model.js';
import type { PeriodMode } from './objective.js';

export interface FitDirections {
  /** Parameter names, in order. */
  names: ('offset' | 'chiN' | 'period')[];
  /** ∂φ_model(x_i)/∂β at the data positions, one array per parameter. */
  columns: Float64Array[];
}

export interface FitPoint {
  chiN: number;
  period: number;
  offset: number;
  periodMode: PeriodMode['mode'];
  /** Solution grid of the classical fit (points and contour steps), reused for the model solves. */
  nx: number;
  ns: number;
}

export function fitDirections(x: Float64Array, at: FitPoint, chain: ChainSpec, resolution: number): FitDirections {
  const model = new LamellaModel({ chain, nx: at.nx, ns: at.ns });
  const hx = 1e-3 * at.chiN;
  const values = (p: FourierSeries, x0 = at.offset) => p.blurred(resolution).evaluateShifted(x, x0);
  const profileAt = (chiN: number, L = at.period) => (at.periodMode === 'equilibrium' ? model.equilibrium(chiN) : model.at(chiN, L)).profile;
  const difference = (up: Float64Array, down: Float64Array, h: number) => Float64Array.from(up, (v, i) => (v - down[i]) / (2 * h));
  const centre = profileAt(at.chiN);
  const h0 = 1e-6 * at.period;
  const names: FitDirections['names'] = ['offset', 'chiN'];
  const columns = [difference(values(centre, at.offset + h0), values(centre, at.offset - h0), h0), difference(values(profileAt(at.chiN + hx)), values(profileAt(at.chiN - hx)), hx)];
  if (at.periodMode === 'free') {
    const hL = 1e-3 * at.period;
    names.push('period');
    columns.push(difference(values(profileAt(at.chiN, at.period + hL)), values(profileAt(at.chiN, at.period - hL)), hL));
  }
  return { names, columns };
}

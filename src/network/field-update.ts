/**
 * The field step of 'alternating' training: an SCFT iteration whose propagator solve is
 * the network. From the networks' own φ on the collocation x grid (float64 quadrature,
 * network-solution.ts) the deviation d of physics/scft-equations.ts gives the simple-
 * mixing update w' = w + λ d (gauge fixed), and the field network is refitted to w'.
 */
import type { TrainConfig } from '../io/schemas/train-config.js';
import type { SystemSpec } from '../physics/chain-schema.js';
import type { SpeciesArrays } from '../physics/fields.js';
import { mixedFieldUpdate } from '../physics/scft-equations.js';
import { PeriodicCell } from '../physics/cell/periodic-cell.js';
import { lamellarPhase, pinLamellarPhase } from '../physics/translation.js';
import type { Tf } from '../autodiff/tf.js';
import { networkSolution } from './network-solution.js';
import type { ScftNetworks } from './scft-networks.js';
import { warmStart } from './warm-start.js';

export interface FieldUpdateResult {
  /** max |d| before the update (kT): the SCFT residual of the networks. */
  residual: number;
  fitLoss: number;
}

/** Phase of the lamellar harmonic the updates hold fixed, and the number of periods in the cell. */
export interface LamellarPin {
  periods: number;
  phase: number;
}

/**
 * Refit the field network to w' = w + λ d(w, φ) (gauge fixed), for fields w on the grid x and
 * the densities φ that answer them; shared by the forward step below and the inverse estimator.
 */
export function refitFieldsToUpdate(tf: Tf, nets: ScftNetworks, chiN: number, x: Float64Array, w: SpeciesArrays, phi: SpeciesArrays, mixing: number, fitSteps: number, learningRate: number, pin?: LamellarPin): FieldUpdateResult {
  if (!nets.field) return { residual: 0, fitLoss: 0 };
  // The networks' cell on this grid: a film's surface field enters the update (physics/scft-equations.ts).
  const cell = nets.cell.withPoints(x.length);
  const { w: target, residual } = mixedFieldUpdate(nets.chain, chiN, w, phi, mixing, cell);
  // Only a cell with a translation symmetry has a phase to pin (walls fix a film's).
  if (pin && nets.chain.species.length === 2 && cell.translation) pinLamellarPhase(target, new PeriodicCell(nets.length, target.A.length, pin.periods), pin.phase);
  const fit = warmStart(tf, nets, { x, w: target, chiN }, fitSteps, learningRate, undefined, nets.field.parameters);
  return { residual, fitLoss: fit.finalLoss };
}

export interface FieldUpdateSettings {
  /** Grid of the update: x points and contour nodes per block of the density quadrature. */
  nx: number;
  nodesPerBlock: number;
  mixing: number;
  fitSteps: number;
  learningRate: number;
  /** Lamellar periods in the cell (the harmonic whose phase is pinned). */
  periods: number;
}

export function fieldUpdateSettings(config: Pick<TrainConfig, 'collocation' | 'training' | 'cell'>): FieldUpdateSettings {
  const { collocation: c, training: t } = config;
  return { nx: c.nx, nodesPerBlock: c.nodesPerBlock, mixing: t.fieldMixing, fitSteps: t.fieldFitSteps, learningRate: t.fieldFitLearningRate, periods: config.cell.kind === 'periodic' ? config.cell.periods : 1 };
}

/**
 * The forward field step of alternating training, with the lamella's translation mode
 * pinned at the phase the fields had at the first update (after the warm start or a
 * transfer), so the iteration cannot wander along it. The pin is part of a checkpoint
 * (`lamellarPin`, `keepPin`): a resumed run holds the phase of the run it continues, not the
 * phase its fields happen to have at its own first update.
 */
export class FieldUpdater {
  private pin: LamellarPin | null = null;

  /** The pin the updates hold (null before the first update, or where there is no translation mode). */
  get lamellarPin(): LamellarPin | null {
    return this.pin;
  }

  /** Hold `pin` (from a checkpoint) instead of taking one at the next update. */
  keepPin(pin: LamellarPin | null): void {
    this.pin = pin;
  }

  constructor(
    readonly tf: Tf,
    readonly nets: ScftNetworks,
    readonly system: SystemSpec,
    readonly settings: FieldUpdateSettings,
  ) {}

  update(): FieldUpdateResult {
    const { tf, nets, settings: st } = this;
    if (!nets.field) return { residual: 0, fitLoss: 0 };
    const sol = networkSolution(tf, nets, this.system, { periods: st.periods, nx: st.nx, nodesPerBlock: st.nodesPerBlock, placeInConvention: false, correctQ: false });
    if (nets.cell.translation) this.pin ??= { periods: st.periods, phase: lamellarPhase(sol.w, st.periods).phase };
    return refitFieldsToUpdate(tf, nets, this.system.chiN, sol.x, sol.w, sol.phi, st.mixing, st.fitSteps, st.learningRate, this.pin ?? undefined);
  }
}

/**
 * The network estimator's 'adam-lbfgs' strategy (network-estimator.ts runs and summarises it):
 * the physics-informed trainer run as a data-driven SCFT iteration. The propagator networks
 * learn the MDE in the current fields (the trainer's 'alternating' strategy); every
 * fieldUpdateEvery steps the fields and χN are updated from the networks' own φ and the data:
 *   exchange part from the data:   w_A − w_B ← χN (φ_B − φ_A)[data],
 *   pressure from incompressibility: (w_A + w_B) ← (w_A + w_B) + χN (φ_A + φ_B − 1)[network],
 *   χN ← χN · r^{1/2},  r = ⟨1 − 2φ_A^data, 1 − 2φ_A^net⟩ / ⟨1 − 2φ_A^net, 1 − 2φ_A^net⟩,
 * so χN stays positive, grows while the network profile is less segregated than the data
 * and shrinks while it is more. At the fixed point the networks solve SCFT at χN and
 * reproduce the data: the exchange field is discovered from the data, not given.
 * The data enter on the model grid through a band-limited least-squares fit
 * (numerics/band-limited-fit.ts), which assumes only periodicity. The offset and period are
 * the classical estimate's (the networks fit χN and the fields, not the phase).
 *
 * A plain gradient variant (χN = e^θ trained by Adam with a data-misfit loss, all terms in
 * one loss) was tried first: χN drifted away from the truth (13.5 → 11.8 for a true 15 in
 * 400 steps), because the propagators fitted the data faster than the fields followed.
 *
 * Units: x in Rg (model frame t = x − x0 mod L), w and χN in kT per chain.
 */
import type { ChainSpec } from '../physics/chain-schema.js';
import { buildChain } from '../physics/chain.js';
import type { ScftSolution } from '../physics/result.js';
import { trainConfigSchema } from '../io/schemas/train-config.js';
import type { TrainConfig } from '../io/schemas/train-config.js';
import { bandLimitedFit } from '../numerics/band-limited-fit.js';
import { Adam } from '../autodiff/adam.js';
import type { Tf } from '../autodiff/tf.js';
import { networkSolution } from '../network/network-solution.js';
import { buildScftNetworks } from '../network/scft-networks.js';
import { LOSS_TERMS } from '../network/losses/terms.js';
import type { LossValues } from '../network/losses/terms.js';
import { ScftProblem } from '../network/problem/scft-problem.js';
import { polishCycle, propagatorWeights, runTraining } from '../training/train-loop.js';
import { RunStopped, stopRequested } from '../runtime/stop.js';
import { RunFailure } from '../io/errors.js';
import { refitFieldsToUpdate } from '../network/field-update.js';
import { warmStartYielding } from '../network/warm-start.js';
import type { ProfileData } from './profile-csv.js';
import { meanInverseVariance, pointSigmas } from './data-weights.js';

/** What the strategy reads (the estimator's settings extend these). */
export interface AdamLbfgsSettings {
  chain: ChainSpec;
  seeds: number[];
  /** Adam steps per seed. */
  steps: number;
  resolution: number;
  learningRate?: number;
  /** Periodic input modes of both networks (default: the trainer's). */
  fourierModes?: number;
  /** Steps between field/χN updates, and their mixing λ. */
  fieldUpdateEvery?: number;
  mixing?: number;
  /**
   * After the Adam steps: this many L-BFGS iterations on the MDE, in cycles of
   * `lbfgsPerUpdate`, each cycle preceded by a field/χN update (0: none).
   */
  lbfgsIterations?: number;
  lbfgsPerUpdate?: number;
  /** Adam steps fitting each seed's networks to the starting spectral solution (default 400). */
  warmStartSteps?: number;
  onProgress?: (seed: number, step: number, steps: number, chiN: number) => void;
}

export interface AdamLbfgsRun {
  seed: number;
  chiN: number;
  trajectory: { step: number; chiN: number }[];
  /** RMS of network φ_A − data at the data points. */
  rmsResidual: number;
  /** w_A − w_B of the network on the model grid (kT). */
  exchange: Float64Array;
  seconds: number;
}

/**
 * The seeds one after the other, each started from the spectral solution `start` at
 * `chiNStart` in the classical cell (length `period`); `t` are the data's model-frame positions.
 */
export async function adamLbfgsRuns(tf: Tf, data: ProfileData, classical: { period: number }, start: ScftSolution, chiNStart: number, t: Float64Array, s: AdamLbfgsSettings): Promise<AdamLbfgsRun[]> {
  const chain = buildChain(s.chain);
  const L = classical.period;
  const { nx, cell } = start;
  const matrix = Float32Array.from(cell.interpolationMatrix(t, s.resolution));
  const sig = pointSigmas(data.sigma, data.x.length);
  const meanInvVar = meanInverseVariance(sig);
  const weights = Float32Array.from(sig, (v) => 1 / (v * v) / meanInvVar);
  const runs: AdamLbfgsRun[] = [];
  const modes = Math.max(2, Math.min(nx / 2 - 1, Math.floor((t.length - 1) / 4)));
  const phiData = bandLimitedFit(t, data.phi, weights, L, modes)(start.x);
  const updateEvery = s.fieldUpdateEvery ?? 50;
  for (const seed of s.seeds) {
    const tr0 = performance.now();
    const config: TrainConfig = trainConfigSchema.parse({
      version: 2,
      kind: 'train',
      system: { chain: s.chain, chiN: chiNStart },
      cell: { period: L, nx, ns: start.ns },
      networks: { field: { seed, ...(s.fourierModes ? { fourierModes: s.fourierModes } : {}) }, propagator: { seed: seed + 101, ...(s.fourierModes ? { fourierModes: s.fourierModes } : {}) } },
      // The trainer's default x grid (32) measured as accurate as the model grid for the MDE, at half the cost.
      collocation: { nx: Math.min(nx, 32), seed: seed + 7 },
      training: { strategy: 'alternating', adamSteps: s.steps, learningRate: s.learningRate ?? 1e-3, logEvery: 25, checkpointEvery: s.steps + 1, fieldUpdateEvery: updateEvery },
    });
    const nets = buildScftNetworks(tf, config, chain, L, true);
    const ws = await warmStartYielding(tf, nets, { x: start.x, w: start.w, chiN: chiNStart, propagators: start.propagators }, s.warmStartSteps ?? 400, 1e-2, undefined, stopRequested);
    if (ws.interrupted) {
      nets.dispose();
      throw new RunStopped(`network estimator stopped by a signal at seed ${seed}, warm-start step ${ws.steps}; no network result was written`);
    }
    const problem = new ScftProblem(tf, nets, config.system, config.collocation, 'detached');
    problem.fieldsFrozen = true;
    let chiN = chiNStart;
    const trajectory: { step: number; chiN: number }[] = [{ step: 0, chiN }];
    /** The field/χN update made after `step` optimisation steps (Adam steps, then L-BFGS iterations). */
    const fieldUpdateAt = (step: number) => {
      const sol = networkSolution(tf, nets, { chain: s.chain, chiN }, { periods: 1, nx, nodesPerBlock: config.collocation.nodesPerBlock, correctQ: false });
      let num = 0;
      let den = 0;
      for (let j = 0; j < nx; j++) {
        const a = 1 - 2 * phiData[j];
        const b = sol.phi.A[j] - sol.phi.B[j];
        num += a * -b;
        den += b * b;
      }
      const ratio = Math.min(1.25, Math.max(0.8, num / den));
      chiN = chiN * Math.sqrt(ratio);
      // The SCFT field update of physics/scft-equations.ts with the data's composition in the
      // exchange part and the networks' incompressibility error (split evenly) in the pressure.
      const phi = { A: new Float64Array(nx), B: new Float64Array(nx) };
      for (let j = 0; j < nx; j++) {
        const excess = 0.5 * (sol.phi.A[j] + sol.phi.B[j] - 1);
        phi.A[j] = phiData[j] + excess;
        phi.B[j] = 1 - phiData[j] + excess;
      }
      refitFieldsToUpdate(tf, nets, chiN, sol.x, sol.w, phi, s.mixing ?? 0.5, config.training.fieldFitSteps, config.training.fieldFitLearningRate);
      trajectory.push({ step, chiN });
      s.onProgress?.(seed, step, s.steps + (s.lbfgsIterations ?? 0), chiN);
    };
    const adam = new Adam(tf, nets.parameters);
    let adamUpdates = 0;
    const unit = Object.fromEntries(LOSS_TERMS.map((k) => [k, 1])) as LossValues;
    const loop = await runTraining(tf, problem, nets.parameters, adam, config, { step: 0, lossWeights: unit, history: [], bestTotal: Infinity, secondsBefore: 0 }, { fieldUpdate: () => fieldUpdateAt((adamUpdates += updateEvery)), shouldStop: stopRequested });
    if (loop.reason === 'interrupted') {
      adam.dispose();
      problem.dispose();
      nets.dispose();
      throw new RunStopped(`network estimator stopped by a signal at seed ${seed}, Adam step ${loop.state.step}; no network result was written`);
    }
    // Quasi-Newton cycles: each a field/χN update, then L-BFGS on the MDE in the new fields
    // (measured in the forward problem: several times the MDE reduction of Adam per second).
    const perUpdate = s.lbfgsPerUpdate ?? 100;
    for (let done = 0; loop.reason !== 'diverged' && done < (s.lbfgsIterations ?? 0); done += perUpdate) {
      const r = await polishCycle(tf, problem, nets.parameters, propagatorWeights(config), perUpdate, () => fieldUpdateAt(s.steps + done), undefined, stopRequested);
      if (r.reason === 'interrupted') {
        adam.dispose();
        problem.dispose();
        nets.dispose();
        throw new RunStopped(`network estimator stopped by a signal at seed ${seed}, L-BFGS iteration ${done + r.iterations}; no network result was written`);
      }
    }
    // Only φ_A and the fields are read here: the adjoint Q correction (a float64 pass over every
    // node: 4.9 s of a 27 s run of three 20-step seeds, measured on a loaded machine) changes Q
    // and F, neither of which the estimate uses.
    const sol = networkSolution(tf, nets, { chain: s.chain, chiN }, { periods: 1, nx, nodesPerBlock: 64, correctQ: false });
    let rss = 0;
    for (let i = 0; i < t.length; i++) {
      let v = 0;
      for (let j = 0; j < nx; j++) v += sol.phi.A[j] * matrix[j * t.length + i];
      rss += (v - data.phi[i]) ** 2;
    }
    const exchange = Float64Array.from(sol.w.A, (a, j) => a - sol.w.B[j]);
    runs.push({ seed, chiN, trajectory, rmsResidual: Math.sqrt(rss / t.length), exchange, seconds: (performance.now() - tr0) / 1000 });
    adam.dispose();
    problem.dispose();
    nets.dispose();
    if (loop.reason === 'diverged') throw new RunFailure(`network estimator: seed ${seed}: ${loop.message}`);
  }
  return runs;
}

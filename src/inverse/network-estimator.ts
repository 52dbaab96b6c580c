/**
 * The network estimator of χN: the physics-informed trainer with χN trainable (χN = e^θ,
 * positive by construction) and a data-misfit term, all terms in one weighted loss
 * (the 'joint' strategy: the data pin φ, the field equations then fix χN and the fields).
 *
 * Frame: the data coordinate x maps to the model cell as t = x − x0 + origin (mod L), with
 * the offset x0 and period L of the classical estimate (the network fits χN and the fields,
 * not the phase). Start: the networks are fitted to a spectral solution at a starting χN
 * (the classical estimate, or a given guess), then trained on physics + data.
 * Uncertainty: several seeds (network initialisations and collocation draws) give a spread;
 * it measures the optimisation's variability, not the statistical error of the data, and is
 * reported as such.
 */
import type { ChainSpec } from '../physics/chain-schema.js';
import { buildChain } from '../physics/chain.js';
import type { SpeciesArrays } from '../physics/fields.js';
import { trainConfigSchema } from '../io/schemas/train-config.js';
import type { TrainConfig } from '../io/schemas/train-config.js';
import { trigInterpolationMatrix } from '../numerics/trig-interpolation.js';
import { solveFixedCell } from '../spectral/scft-solver.js';
import { Adam } from '../neural/adam.js';
import { selectBackend } from '../neural/backend.js';
import type { BackendKind } from '../neural/backend.js';
import { networkSolution } from '../neural/network-solution.js';
import { ParameterSet } from '../neural/parameters.js';
import { buildScftNetworks } from '../neural/scft-networks.js';
import { LOSS_TERMS, ScftProblem } from '../neural/scft-problem.js';
import type { LossValues } from '../neural/scft-problem.js';
import { runTraining } from '../neural/train-loop.js';
import { warmStart } from '../neural/warm-start.js';
import type { ClassicalEstimate } from './classical.js';
import type { ProfileData } from './profile-csv.js';

export interface NetworkEstimatorSettings {
  chain: ChainSpec;
  seeds: number[];
  steps: number;
  /** χN the networks start from; default the classical estimate. */
  chiNStart?: number;
  resolution: number;
  backend: BackendKind;
  learningRate?: number;
  dataWeight?: number;
  onProgress?: (seed: number, step: number, steps: number, chiN: number) => void;
}

export interface NetworkRun {
  seed: number;
  chiN: number;
  trajectory: { step: number; chiN: number }[];
  rmsResidual: number;
  /** w_A − w_B of the network on the model grid (kT). */
  exchange: Float64Array;
  seconds: number;
}

export interface NetworkEstimate {
  chiN: number;
  spread: number;
  interval: [number, number];
  runs: NetworkRun[];
  chiNStart: number;
  backend: string;
  tfjs: string;
  seconds: number;
  /** Model grid (Rg, cell frame) of `exchange`. */
  x: Float64Array;
  notes: string[];
}

function modelFrame(data: ProfileData, est: ClassicalEstimate): Float64Array {
  const L = est.period;
  return Float64Array.from(data.x, (x) => {
    const t = (x - est.offset + est.modelOrigin) % L;
    return t < 0 ? t + L : t;
  });
}

export async function estimateNetwork(data: ProfileData, classical: ClassicalEstimate, s: NetworkEstimatorSettings): Promise<NetworkEstimate> {
  const t0 = performance.now();
  const handle = await selectBackend(s.backend);
  const tf = handle.tf;
  const chain = buildChain(s.chain);
  const L = classical.period;
  const nx = classical.solution.nx;
  const chiNStart = s.chiNStart ?? classical.chiN;
  // Starting fields: the spectral solution at the starting χN in the classical cell.
  const start = solveFixedCell({ system: { chain: s.chain, chiN: chiNStart }, length: L, periods: 1, nx, ns: classical.solution.ns, initial: classical.solution.w, keepPropagators: true });
  const t = modelFrame(data, classical);
  const matrix = Float32Array.from(trigInterpolationMatrix(nx, L, t, s.resolution));
  const sig = data.sigma ?? new Float64Array(data.x.length).fill(1);
  let meanInvVar = 0;
  for (const v of sig) meanInvVar += 1 / (v * v);
  meanInvVar /= sig.length;
  const weights = Float32Array.from(sig, (v) => 1 / (v * v) / meanInvVar);
  const runs: NetworkRun[] = [];
  for (const seed of s.seeds) {
    const tr0 = performance.now();
    const config: TrainConfig = trainConfigSchema.parse({
      version: 1,
      kind: 'train',
      system: { chain: s.chain, chiN: chiNStart },
      cell: { period: L, nx, ns: classical.solution.ns },
      networks: { field: { seed }, propagator: { seed: seed + 101 } },
      collocation: { nx, seed: seed + 7 },
      losses: { weights: { data: s.dataWeight ?? 100, selfConsistency: 10, incompressibility: 10 } },
      training: { strategy: 'joint', steps: s.steps, learningRate: s.learningRate ?? 1e-3, logEvery: 25, checkpointEvery: s.steps + 1 },
    });
    const nets = buildScftNetworks(tf, config, chain, L, true);
    warmStart(tf, nets, { x: start.x, w: start.w, chiN: chiNStart, propagators: start.propagators }, 400, 1e-2);
    const problem = new ScftProblem(tf, nets, config.system, config.collocation, 'coupled');
    problem.setData(matrix, Float32Array.from(data.phi), weights, true);
    const chiNParams = new ParameterSet(tf, [{ name: 'inverse/logChiN', variable: problem.logChiN! }]);
    const params = ParameterSet.join(nets.parameters, chiNParams);
    const adam = new Adam(tf, params);
    const unit = Object.fromEntries(LOSS_TERMS.map((k) => [k, 1])) as LossValues;
    const loop = await runTraining(tf, problem, params, adam, config, { step: 0, lossWeights: unit, history: [], bestTotal: Infinity, secondsBefore: 0 }, {
      chiN: () => problem.currentChiN(),
      onProgress: (p) => s.onProgress?.(seed, p.step, p.steps, problem.currentChiN()),
    });
    const chiN = problem.currentChiN();
    const sol = networkSolution(tf, nets, config.system, { periods: 1, nx, nodesPerBlock: 64 });
    let rss = 0;
    for (let i = 0; i < t.length; i++) {
      let v = 0;
      for (let j = 0; j < nx; j++) v += sol.phi.A[j] * matrix[j * t.length + i];
      rss += (v - data.phi[i]) ** 2;
    }
    const exchange = Float64Array.from(sol.w.A, (a, j) => a - sol.w.B[j]);
    runs.push({ seed, chiN, trajectory: loop.state.history.map((h) => ({ step: h.step, chiN: h.chiN ?? Number.NaN })), rmsResidual: Math.sqrt(rss / t.length), exchange, seconds: (performance.now() - tr0) / 1000 });
    adam.dispose();
    problem.dispose();
    nets.dispose();
    if (loop.reason === 'diverged') throw new Error(`network estimator: seed ${seed}: ${loop.message}`);
  }
  const values = runs.map((r) => r.chiN);
  const mean = values.reduce((a, b) => a + b, 0) / values.length;
  const spread = values.length > 1 ? Math.sqrt(values.reduce((a, b) => a + (b - mean) ** 2, 0) / (values.length - 1)) : 0;
  const notes = [
    `seed spread over ${values.length} run(s): it measures how far independent trainings land apart, not the statistical error of the data; read the classical profile-likelihood interval for that`,
    `offset and period taken from the classical estimate; networks started from the spectral solution at χN = ${chiNStart.toPrecision(6)}`,
  ];
  return {
    chiN: mean,
    spread,
    interval: [Math.min(...values), Math.max(...values)],
    runs,
    chiNStart,
    backend: handle.backend,
    tfjs: handle.tfjsVersion,
    seconds: (performance.now() - t0) / 1000,
    x: start.x,
    notes,
  };
}

export type { SpeciesArrays };

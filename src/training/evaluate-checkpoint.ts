/**
 * Metrics of a saved network: rebuild the networks from the checkpoint, solve the
 * spectral reference for the same system at the checkpoint's cell length, compare.
 */
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { InputError } from '../io/errors.js';
import { loadJsonFile } from '../io/load-json.js';
import { solutionFileSchema } from '../io/formats/solution.js';
import { summarize } from '../io/formats/solution.js';
import { buildChain } from '../physics/chain.js';
import type { ScftSolution } from '../physics/result.js';
import type { SolutionMetrics } from '../physics/solution-metrics.js';
import { solveFromConfig } from '../spectral/solve-from-config.js';
import { selectBackend } from '../autodiff/backend.js';
import type { BackendKind } from '../autodiff/backend.js';
import { loadCheckpoint, splitWeights } from './checkpoint.js';
import type { CheckpointFile } from './checkpoint.js';
import { buildScftNetworks } from '../network/scft-networks.js';
import { ScftProblem } from '../network/problem/scft-problem.js';
import type { LossValues } from '../network/losses/terms.js';
import { evaluateNetworks } from './train-run.js';

export interface CheckpointEvaluation {
  checkpoint: string;
  backend: string;
  tfjs: string;
  trainedOn: { backend: string; tfjs: string };
  step: number;
  phase: string;
  errors: SolutionMetrics;
  freshResiduals: LossValues;
  reference: ReturnType<typeof summarize>;
  network: ReturnType<typeof summarize>;
  solutions: { reference: ScftSolution; network: ScftSolution };
  file: CheckpointFile;
}

export async function evaluateCheckpoint(dir: string, backend: BackendKind = 'auto', seed = 0x5eed): Promise<CheckpointEvaluation> {
  const handle = await selectBackend(backend);
  const tf = handle.tf;
  const { file, weights } = loadCheckpoint(tf, dir);
  const config = file.config;
  const chain = buildChain(config.system.chain);
  // Start the fresh reference from the one saved at training time: a symmetric lamella has
  // two equivalent phases (A and B swapped), and the comparison must use the same one.
  const saved = join(dir, 'reference.json');
  const initial = existsSync(saved) ? (() => {
    const f = loadJsonFile(saved, solutionFileSchema);
    return { A: Float64Array.from(f.grid.wA), B: Float64Array.from(f.grid.wB) };
  })() : undefined;
  // A periodic run is judged at the period it trained in; a film at its configured thickness.
  const cell = config.cell.kind === 'periodic' ? { kind: 'periodic' as const, period: file.length / file.periods, periods: file.periods, nx: config.cell.nx, ns: config.cell.ns } : config.cell;
  const ref = solveFromConfig({ system: config.system, cell, solver: config.solver, output: { propagators: true } }, { initial });
  const nets = buildScftNetworks(tf, config, chain, ref.solution.cell, !config.system.externalField);
  try {
    nets.parameters.loadNamedWeights(splitWeights(weights).params);
  } catch (e) {
    nets.dispose();
    throw new InputError(`${dir}: checkpoint does not match its own config: ${(e as Error).message}`);
  }
  const { network, errors } = evaluateNetworks(tf, nets, config, ref.solution, true);
  const problem = new ScftProblem(tf, nets, config.system, config.collocation);
  const freshResiduals = problem.freshResiduals(seed, 1024);
  problem.dispose();
  nets.dispose();
  return {
    checkpoint: dir,
    backend: handle.backend,
    tfjs: handle.tfjsVersion,
    trainedOn: { backend: file.provenance.backend, tfjs: file.provenance.tfjs },
    step: file.step,
    phase: network.phase,
    errors,
    freshResiduals,
    reference: summarize(ref.solution),
    network: summarize(network),
    solutions: { reference: ref.solution, network },
    file,
  };
}

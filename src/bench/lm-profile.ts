/**
 * `npm run bench -- --lm-profile`: where the CPU time of one Levenberg–Marquardt iteration of
 * the second-order phase goes (docs/second-order-training.md, "Cost per iteration"). The
 * networks of a train config are warm-started on the reference; then each part of one
 * propagator's iteration is timed on its own, twice: the Jacobian (float64 jets), the normal
 * matrix, the Cholesky factorisation and solve, a trial cost, the whole-system loss after it,
 * and the evaluation against the reference. Printed: wall and CPU seconds (user + sys of this
 * process; the machine may be shared, CPU time is the steadier figure). Options:
 * --config=FILE (default the shipped χN = 15 config), --seed=N (network seed), --passes=N
 * (default 2; the first pass includes the JIT's warm-up), --js (the JS forms of the normal
 * matrix and Cholesky instead of the f64x2 kernels of numerics/float64-kernels.ts), --part=all
 * (the joint system's iteration instead of each propagator's).
 */
import { readFileSync } from 'node:fs';
import { selectBackend } from '../autodiff/backend.js';
import { trainConfigSchema } from '../io/schemas/train-config.js';
import { ScftResidualSystem } from '../network/least-squares/scft-residual-system.js';
import type { ResidualPart } from '../network/least-squares/scft-residual-system.js';
import { buildScftNetworks } from '../network/scft-networks.js';
import { warmStart } from '../network/warm-start.js';
import { cholesky, choleskySolve } from '../numerics/cholesky.js';
import { loadFloat64Passes } from '../autodiff/float64-passes.js';
import { groupedNormalEquations, shiftedGroups } from '../numerics/grouped-normal-equations.js';
import { buildChain } from '../physics/chain.js';
import { solveFromConfig } from '../spectral/solve-from-config.js';
import { evaluateNetworks } from '../training/train-run.js';

function cpuSeconds(): number {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1e6;
}

/** Wall and CPU seconds of f, printed under the label. */
function timed<T>(label: string, f: () => T): T {
  const w0 = performance.now();
  const c0 = cpuSeconds();
  const out = f();
  console.log(`  ${label.padEnd(44)} wall ${((performance.now() - w0) / 1000).toFixed(3)} s   cpu ${(cpuSeconds() - c0).toFixed(3)} s`);
  return out;
}

export async function runLmProfile(): Promise<void> {
  const arg = (k: string) => process.argv.find((a) => a.startsWith(`--${k}=`))?.slice(k.length + 3);
  const file = arg('config') ?? 'configs/diblock-symmetric-chiN15.train.json';
  const raw = JSON.parse(readFileSync(file, 'utf8'));
  const seed = arg('seed');
  if (seed !== undefined) raw.networks = { ...raw.networks, field: { ...raw.networks?.field, seed: Number(seed) }, propagator: { ...raw.networks?.propagator, seed: Number(seed) } };
  const config = trainConfigSchema.parse(raw);
  // --js: the JS forms of the normal matrix, Cholesky and the jet passes (the f64x2 kernels otherwise).
  if (!process.argv.includes('--js')) await loadFloat64Passes();
  const { tf } = await selectBackend('wasm');
  const chain = buildChain(config.system.chain);
  const reference = solveFromConfig({ system: config.system, cell: config.cell, solver: config.solver, output: { propagators: true } }).solution;
  const nets = buildScftNetworks(tf, config, chain, reference.length, !config.system.externalField);
  if (config.warmStart.type === 'reference') warmStart(tf, nets, { x: reference.x, w: reference.w, chiN: config.system.chiN, propagators: reference.propagators }, config.warmStart.adamSteps, config.warmStart.learningRate);
  const so = config.training.secondOrder;
  const grid = { nx: so.nx ?? config.collocation.nx, nodesPerBlock: so.nodesPerBlock ?? config.collocation.nodesPerBlock };
  const sys = new ScftResidualSystem(nets, config.system, grid, config.losses.weights);
  const theta = nets.parameters.flatten();
  console.log(`LM iteration profile: ${file}, ${sys.size} parameters, grid ${grid.nx} × ${grid.nodesPerBlock} steps per block, load average ${(await import('node:os')).loadavg()[0].toFixed(1)}`);
  // --part=all: the joint system (every network, the field equations: the joint strategy's and
  // the least-squares network estimator's normal matrix).
  const sides: ResidualPart[] = arg('part') === 'all' ? ['all'] : nets.shared ? ['q'] : ['q', 'qDagger'];
  const passes = Number(arg('passes') ?? 2);
  for (let rep = 0; rep < passes; rep++) {
    for (const part of sides) {
      const { first, count } = part === 'all' ? { first: 0, count: sys.size } : sys.columnsOf(part);
      console.log(` ${part} (${count} parameters), pass ${rep + 1}`);
      const e = timed('Jacobian (float64 jets)', () => sys.evaluate(theta, true, part));
      const groups = shiftedGroups(e.groups!, first);
      console.log(`  groups: ${groups.map((g) => `${g.r.length} rows × ${g.columns.length}${g.factored ? ` + ${g.factored.columns.length} through ${g.factored.t}` : ''}`).join(', ')}`);
      const { A, g } = timed('normal matrix JᵀJ, Jᵀr', () => groupedNormalEquations(count, groups));
      const M = A.slice();
      for (let i = 0; i < count; i++) M[i * count + i] *= 1.001;
      const f = timed(`Cholesky (n = ${count})`, () => cholesky(M, count));
      timed('solve', () => choleskySolve(f, g));
      const moved = Float64Array.from(theta);
      moved[first] += 1e-3;
      timed('trial cost of the propagator', () => sys.evaluate(moved, false, part));
      timed('whole-system loss after it', () => sys.evaluate(moved, false));
    }
  }
  timed('φA against the reference', () => evaluateNetworks(tf, nets, config, reference));
  nets.dispose();
}

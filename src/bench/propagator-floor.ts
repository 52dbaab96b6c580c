/**
 * `npm run bench -- --propagator-floor`: what the propagator networks alone reach in the
 * self-consistent field (docs/second-order-training.md, "What limits the accuracy"). The
 * reference is solved; the networks are warm-started on it; the field network is fitted to
 * the reference's w on the phase's grid (exactly, when it is linear in its Fourier features)
 * and held there; then Levenberg–Marquardt trains q and q† alone in one alternating cycle.
 * Printed: φ_A relative L2 against the reference every 5 iterations, the kept state, the F
 * error, and where the final error sits (at the collocation x points, between them, from
 * the phase's own quadrature on its grid). Options: --config=FILE (a train config; default the
 * shipped χN = 15 one), --iterations=N (default 80), --nx=N (the phase's grid, default the
 * config's collocation.nx). The machine is shared while it runs: timings are wall-clock.
 */
import { readFileSync } from 'node:fs';
import { selectBackend } from '../autodiff/backend.js';
import { trainConfigSchema } from '../io/schemas/train-config.js';
import { ScftResidualSystem } from '../network/least-squares/scft-residual-system.js';
import { networkSolution } from '../network/network-solution.js';
import { buildScftNetworks } from '../network/scft-networks.js';
import { warmStart } from '../network/warm-start.js';
import { levenbergMarquardt } from '../numerics/levenberg-marquardt.js';
import { buildChain } from '../physics/chain.js';
import { solveFromConfig } from '../spectral/solve-from-config.js';
import { runSecondOrder } from '../training/second-order-phase.js';
import { evaluateNetworks } from '../training/train-run.js';

function relL2(u: ArrayLike<number>, r: ArrayLike<number>, idx: number[]): number {
  let a = 0;
  let b = 0;
  for (const j of idx) {
    a += (u[j] - r[j]) ** 2;
    b += r[j] ** 2;
  }
  return Math.sqrt(a / b);
}

export async function runPropagatorFloorBench(): Promise<void> {
  const arg = (k: string) => process.argv.find((a) => a.startsWith(`--${k}=`))?.slice(k.length + 3);
  const file = arg('config') ?? 'configs/diblock-symmetric-chiN15.train.json';
  const iterations = Number(arg('iterations') ?? 80);
  const config = trainConfigSchema.parse(JSON.parse(readFileSync(file, 'utf8')));
  const nx = Number(arg('nx') ?? config.collocation.nx);
  const nodesPerBlock = config.collocation.nodesPerBlock;
  const { tf } = await selectBackend('wasm');
  const chain = buildChain(config.system.chain);
  const reference = solveFromConfig({ system: config.system, cell: config.cell, solver: config.solver, output: { propagators: true } }).solution;
  if (reference.nx % nx !== 0) throw new Error(`--nx=${nx} must divide the reference's nx = ${reference.nx}`);
  const nets = buildScftNetworks(tf, config, chain, reference.length, !config.system.externalField);
  warmStart(tf, nets, { x: reference.x, w: reference.w, chiN: config.system.chiN, propagators: reference.propagators }, config.warmStart.adamSteps, config.warmStart.learningRate);
  const sys = new ScftResidualSystem(nets, config.system, { nx, nodesPerBlock }, config.losses.weights);
  const theta = nets.parameters.flatten();
  const stride = reference.nx / nx;
  if (nets.field) {
    const target = { A: Float64Array.from({ length: nx }, (_, j) => reference.w.A[j * stride]), B: Float64Array.from({ length: nx }, (_, j) => reference.w.B[j * stride]) };
    const fit = sys.fieldFit(theta, target);
    const r = levenbergMarquardt(fit, theta.slice(fit.first, fit.first + fit.size), { maxIterations: 50 });
    theta.set(r.x, fit.first);
    nets.parameters.unflatten(theta);
    console.log(`field network held at the reference's field: refit RMS ${Math.sqrt(2 * r.cost).toExponential(2)} kT on ${nx} points`);
  }
  const t0 = performance.now();
  const evaluate = () => evaluateNetworks(tf, nets, config, reference).errors;
  const so = await runSecondOrder(
    nets,
    config.system,
    config.losses.weights,
    { iterations, nx, nodesPerBlock, damping: 'marquardt', evaluateEvery: 5, lossTolerance: 0, strategy: 'alternating', cycles: 1, firstCycleIterations: 0, jointIterations: 0, fieldMixing: 0.5, fieldStep: 'simple', andersonHistory: 1, periods: reference.periods },
    {
      evaluate: () => evaluate().phiA.relativeL2,
      onProgress: (p) => {
        if (p.phiError !== undefined) console.log(`iteration ${p.iteration}: loss ${p.loss.toExponential(3)}, μ ${p.mu.toExponential(1)}, φA ${p.phiError.toExponential(3)}, ${((performance.now() - t0) / 1000).toFixed(1)} s`);
      },
    },
  );
  const e = evaluate();
  console.log(`kept: iteration ${so.best.iteration}, φA ${e.phiA.relativeL2.toExponential(2)}, F error ${e.freeEnergyError.toExponential(2)} kT, wA − wB ${e.exchangeField.relativeL2.toExponential(2)}`);
  const sol = networkSolution(tf, nets, config.system, { periods: reference.periods, nx: reference.nx, nodesPerBlock: 64, placeInConvention: false });
  const all = [...Array(reference.nx).keys()];
  const on = all.filter((j) => j % stride === 0);
  const off = all.filter((j) => j % stride !== 0);
  const st = sys.state(nets.parameters.flatten());
  const refOn = Float64Array.from({ length: nx }, (_, j) => reference.phi.A[j * stride]);
  console.log(
    `φA error without the phase-convention shift ${relL2(sol.phi.A, reference.phi.A, all).toExponential(2)}: at the collocation x ${relL2(sol.phi.A, reference.phi.A, on).toExponential(2)}` +
      (off.length ? `, between them ${relL2(sol.phi.A, reference.phi.A, off).toExponential(2)}` : '') +
      `; from the phase's own quadrature on its grid ${relL2(st.phi.A, refOn, [...Array(nx).keys()]).toExponential(2)}`,
  );
  nets.dispose();
}

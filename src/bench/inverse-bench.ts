/**
 * Timing of the inverse estimators (not a test: prints figures, never fails on a time). The case: f = 0.5, χN = 15, 64 points over one period, 2 % Gaussian noise with a
 * sigma column, equilibrium period. Each fit starts from fresh models (no cache, no warm
 * start carried over), as a CLI run does; one untimed fit first warms up the JIT.
 */
import { invertConfigSchema } from '../io/schemas/invert-config.js';
import { createModels, estimateClassical } from '../inverse/classical.js';
import { estimateNetwork } from '../inverse/network-estimator.js';
import type { ProfileData } from '../inverse/profile-csv.js';
import { synthesize } from '../inverse/synth.js';
import { compareWithTruth } from '../inverse/truth-comparison.js';
import type { ChainSpec } from '../physics/chain-schema.js';
import { fitFilm } from '../inverse/film/film-fit.js';
import { synthesizeFilm } from '../inverse/film/film-synth.js';

function profile(chain: ChainSpec, seed: number, nx: number, ns: number): ProfileData {
  const s = synthesize({ chain, chiN: 15, points: 64, noise: 0.02, seed, periods: 1, offset: 0.7, period: 'equilibrium', resolution: 0, nx, ns });
  return { source: `synthetic seed ${seed}`, x: s.x, xRaw: s.x, phi: s.phi, sigma: new Float64Array(64).fill(0.02), lines: [], units: { x: 'Rg' } };
}

export async function runInverseBench(): Promise<void> {
  const chain: ChainSpec = { type: 'diblock', f: 0.5, segmentRatio: 1 };
  console.log('classical inversion, f = 0.5, χN = 15, 64 points, 2 % noise (sigma column), equilibrium period, target 2 s');
  console.log('  grid      seed   time s   χN        68.3 % interval        95 % interval          solves (coarse)  χN evaluations');
  for (const [nx, ns] of [
    [64, 100],
    [32, 60],
  ]) {
    const settings = { chain, nx, ns, period: { mode: 'equilibrium' as const }, resolution: 0, profilePoints: 9 };
    estimateClassical(profile(chain, 99, nx, ns), settings, createModels(settings));
    for (const seed of [1, 2, 3]) {
      const data = profile(chain, seed, nx, ns);
      const e = estimateClassical(data, settings, createModels(settings));
      const iv = (v: [number, number]) => `[${v[0].toFixed(3)}, ${v[1].toFixed(3)}]`;
      console.log(
        `  ${`${nx}×${ns}`.padEnd(9)} ${String(seed).padStart(4)} ${e.seconds.toFixed(3).padStart(8)}   ${e.chiN.toFixed(4).padEnd(9)} ${iv(e.interval).padEnd(22)} ${iv(e.interval95).padEnd(22)} ${`${e.cost.solves} (${e.cost.coarseSolves})`.padEnd(16)} ${e.cost.chiNEvaluations}`,
      );
    }
  }
  // The network estimator with the invert defaults, one seed, on the first noisy profile.
  const net = invertConfigSchema.parse({ version: 2, kind: 'invert', system: { chain } }).network;
  const settings = { chain, nx: 64, ns: 100, period: { mode: 'equilibrium' as const }, resolution: 0, profilePoints: 0 };
  const data = profile(chain, 1, 64, 100);
  const cl = estimateClassical(data, settings, createModels(settings));
  const ne = await estimateNetwork(data, cl, {
    chain,
    seeds: [1],
    strategy: net.strategy,
    steps: net.adamSteps,
    fieldUpdateEvery: net.fieldUpdateEvery,
    lbfgsIterations: net.lbfgsIterations,
    lbfgsPerUpdate: net.lbfgsPerUpdate,
    secondOrderIterations: net.secondOrderIterations,
    dataWeight: net.dataWeight,
    resolution: 0,
    backend: 'wasm',
  });
  console.log(
    `network estimator (the invert defaults: strategy ${net.strategy}, one seed, wasm), same case, seed 1 (target: 15 s per seed with least-squares, 2 min with adam-lbfgs): ` +
      `χN = ${ne.chiN.toFixed(4)} (classical ${cl.chiN.toFixed(4)}) in ${ne.seconds.toFixed(1)} s`,
  );
  runFilmIntervalBench(chain);
}

/**
 * A film fit with the intervals of χN and both wall affinities (the bottom wall prefers A, the
 * top B): 40 points of a composition profile from a finer film solve (32 × 80) with 2 % noise,
 * fitted on 16 points × 40 contour steps. Each interval trial is a refit of the other parameters.
 */
function runFilmIntervalBench(chain: ChainSpec): void {
  const truth = { chiN: 16, bottom: 1.0, top: -0.6, thickness: 5, width: 0.25, offset: 0.3 };
  const d = synthesizeFilm({ kind: 'phi', chain, ...truth, wallRange: 0.25, points: 40, noise: 0.02, seed: 5, instrument: {}, nx: 32, ns: 80 });
  const trials: Record<string, number> = { chiN: 0, bottom: 0, top: 0 };
  const r = fitFilm(
    { kind: 'phi', source: 'synthetic', x: d.x, y: d.y, sigma: d.sigma },
    {
      model: { chain, nx: 16, ns: 40, wallRange: 0.25 },
      thickness: truth.thickness,
      instrument: {},
      chiNRange: [5, 60],
      affinityRange: [-5, 5],
      start: { bottom: 1, top: -1 },
      intervals: ['chiN', 'bottom', 'top'],
      onProgress: (stage, detail) => {
        const k = stage.replace('interval ', '');
        if (stage.startsWith('interval') && detail.includes('Δχ²')) trials[k]++;
      },
    },
  );
  const iv = (k: 'chiN' | 'bottom' | 'top') => {
    const i = r.intervals[k]!['95%'];
    return `${k} ${r.params[k].toFixed(3)} [${i.lo.toFixed(3)}${i.limitedByRange.lo ? ' (bound)' : ''}, ${i.hi.toFixed(3)}${i.limitedByRange.hi ? ' (bound)' : ''}] ${trials[k]} trials`;
  };
  console.log(`film fit (H = 5 Rg, 40 points, 2 % noise, 16 × 40 grid) with the 68 % and 95 % intervals of χN and both affinities: fit ${r.seconds.fit.toFixed(1)} s, intervals ${r.seconds.intervals.toFixed(1)} s (${r.cost.solves} film solves)`);
  console.log(`  95 %: ${iv('chiN')}; ${iv('bottom')}; ${iv('top')}`);
}

/**
 * The network estimator's convergence from a start 10 % low (the long run of which
 * tests/inverse/network.test.ts keeps a short version on a coarser grid): noiseless f = 0.5,
 * χN = 15, 64 points on the 64 × 100 grid, started at χN = 13.5, 200 Adam steps then 12 cycles of
 * 100 L-BFGS iterations. Prints the χN trajectory, the final χN error (target: within 1 %) and
 * the relative L2 error of the discovered w_A − w_B against the self-consistent one (target 5 %).
 */
export async function runNetworkConvergenceBench(): Promise<void> {
  const chain: ChainSpec = { type: 'diblock', f: 0.5, segmentRatio: 1 };
  const s = synthesize({ chain, chiN: 15, points: 64, noise: 0, seed: 1, periods: 1, offset: 0, period: 'equilibrium', resolution: 0, nx: 64, ns: 100 });
  const data: ProfileData = { source: 'synthetic, noiseless', x: s.x, xRaw: s.x, phi: s.phi, lines: [], units: { x: 'Rg' } };
  const cl = estimateClassical(data, { chain, nx: 64, ns: 100, period: { mode: 'equilibrium' }, resolution: 0, profilePoints: 0 });
  const ne = await estimateNetwork(data, cl, { chain, seeds: [1], chiNStart: 13.5, strategy: 'adam-lbfgs', steps: 200, fieldUpdateEvery: 50, lbfgsIterations: 1200, lbfgsPerUpdate: 100, resolution: 0, backend: 'wasm' });
  const vs = compareWithTruth('synthetic', 15, chain, cl, ne).estimators.network;
  console.log('network estimator convergence, noiseless f = 0.5, χN = 15, 64 points, started at χN = 13.5 (200 Adam steps + 1200 L-BFGS iterations, one seed, wasm)');
  console.log(`  χN after each field update (step: χN): ${ne.runs[0].trajectory.map((p) => `${p.step}: ${p.chiN.toFixed(3)}`).join(', ')}`);
  console.log(
    `  final χN = ${ne.chiN.toFixed(4)} (${(100 * vs.relativeError).toFixed(2)} %, target within 1 %), w_A − w_B relative L2 ${vs.exchangeFieldRelativeL2!.toExponential(2)} (target < 5e-2), ${ne.seconds.toFixed(1)} s`,
  );
}


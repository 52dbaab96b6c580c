/**
 * `mesofield demo`: the README's main job on demo data, end to end.
 *
 * Scenario (ours, invented for the demo): a symmetric AB diblock annealed at a temperature
 * where χN = 15. We solve the reference lamella with its equilibrium period, train a
 * warm-started network on a short budget, evaluate it against the reference, and write a
 * report of each, then invert a synthetic noisy profile of the same lamella for χN,
 * printing a short summary and the paths.
 */
import type { Command } from 'commander';
import { trainProgressHooks } from '../train-progress.js';
import { join } from 'node:path';
import type { OutputDirectory } from '../../io/output-directory.js';
import { parseOrThrow } from '../../io/errors.js';
import { solveConfigSchema } from '../../io/schemas/solve-config.js';
import { trainConfigSchema } from '../../io/schemas/train-config.js';
import { solutionText, solutionToFile } from '../../io/formats/solution.js';
import type { SolutionFile } from '../../io/formats/solution.js';
import { formatNumber } from '../../io/number-format.js';
import { formatText } from '../../io/formats/file-format.js';
import { SYNTH_TRUTH_VERSION, synthTruthSchema } from '../../io/formats/synth-truth.js';
import { phaseLabel } from '../../physics/lamellar-window.js';
import { provenance } from '../../io/versions.js';
import { reportRunDirectory } from '../../reports/report-run-directory.js';
import { estimateClassical } from '../../inverse/classical.js';
import { classicalBlock, fitCsv, inversionResult, networkBlock, inversionResultText } from '../../inverse/inversion-result.js';
import { compareWithTruth } from '../../inverse/truth-comparison.js';
import { parseProfileCsv } from '../../inverse/profile-csv.js';
import { synthCsv, synthesize } from '../../inverse/synth.js';
import { formatDuration, Progress } from '../progress.js';
import { action } from '../run-command.js';
import { claimOut, withOutput } from '../run-output.js';
import { solveOnWorker } from '../solve-on-worker.js';
import { installStopHandlers, RunStopped, stopRequested, yieldToEvents } from '../../runtime/stop.js';

export const DEMO_SYSTEM = { chain: { type: 'diblock', f: 0.5 }, chiN: 15 } as const;

export const DEMO_SOLVE_CONFIG = {
  version: 2,
  kind: 'solve',
  system: DEMO_SYSTEM,
  cell: { period: 'equilibrium', periods: 1, nx: 64, ns: 100 },
  output: { propagators: true },
} as const;

export const DEMO_TRAIN_CONFIG = {
  version: 2,
  kind: 'train',
  system: DEMO_SYSTEM,
  cell: { period: 'equilibrium', nx: 64, ns: 100 },
  // The second-order recipe of configs/diblock-symmetric-chiN15.train.json (docs/second-order-training.md):
  // a field network linear in 12 Fourier modes (refitted exactly), 2×16 propagator networks on
  // 64 × 25 collocation points per block, 40 LM iterations per propagator before the first
  // field step, then Anderson-mixed field steps (mixing 0.2) between the LM cycles; measured
  // over network seeds 1–5: φA 2.9e-5 to 5.2e-5, all below 1e-4. tests/cli/demo-config.test.ts
  // holds this equal to the shipped config.
  networks: { field: { hidden: [], fourierModes: 12 }, propagator: { hidden: [16, 16] } },
  collocation: { nx: 64, nodesPerBlock: 24, random: 0 },
  warmStart: { type: 'reference', adamSteps: 400, learningRate: 0.01 },
  training: { adamSteps: 0, evaluateEvery: 1, fieldMixing: 0.2, secondOrderIterations: 160, secondOrder: { strategy: 'alternating', cycles: 6, firstCycleIterations: 40, fieldStep: 'anderson', evaluateEvery: 5 } },
} as const;

const report = (runDir: string, outDir: string) => reportRunDirectory(runDir, outDir);

export function registerDemo(program: Command): void {
  program
    .command('demo')
    .description('run the whole chain on the demo system (symmetric diblock, χN = 15) into a directory')
    .option('--out <dir>', 'output directory', 'reports/demo')
    .option('--backend <b>', 'tfjs backend for the network: auto | native | wasm | cpu', 'auto')
    .option('--overwrite', 'replace a previous demo output in --out (only the files mesofield wrote there)')
    .option('--quiet', 'no progress on stderr')
    .action(
      action(async (flags: { out: string; backend: string; overwrite?: boolean; quiet?: boolean }) => {
        const out = claimOut(flags, 'demo');
        const uninstall = installStopHandlers('demo', `stopping after the current stage; the finished parts stay in ${flags.out}, marked incomplete`);
        return withOutput(out, () => runDemo(flags, out!)).finally(uninstall);
      }),
    );
}

/** Every file goes through the claimed output directory (`out`), so a stopped demo leaves a marked, incomplete output. */
async function runDemo(flags: { out: string; backend: string; quiet?: boolean }, out: OutputDirectory): Promise<void> {
  const t0 = performance.now();
  const progress = new Progress('demo', flags.quiet);
  // A signal is answered between stages (the reference solve, the synthetic data and the classical
  // fit take seconds each) and within a step inside the training and the network estimator.
  const stopped = (after: string) => new RunStopped(`demo stopped by a signal after ${after}; the finished parts are in ${flags.out} (marked incomplete; run the demo again with --overwrite to redo it)`);
  const between = async (after: string) => {
    await yieldToEvents();
    if (stopRequested()) throw stopped(after);
  };
  const config = parseOrThrow(solveConfigSchema, DEMO_SOLVE_CONFIG, 'demo solve config');
  await between('nothing');
  progress.update('1/3 reference solve with period optimisation', true);
  // On a worker thread, so a signal ends the solve at once (a period search is synchronous work).
  const ref = await solveOnWorker(
    { config, source: 'demo solve config', files: true, json: false },
    (st) => progress.update(`period search: evaluation ${st.done}, ${st.detail}`),
    () => stopped('nothing (it was in the reference solve)'),
  );
  const refDir = join(flags.out, 'reference');
  const refFiles = ref.files!;
  out.write({
    'reference/solution.json': refFiles['solution.json'],
    'reference/profile.csv': refFiles['profile.csv'],
  });
  const refReport = report(refDir, join(refDir, 'report'));
  const s = (JSON.parse(refFiles['solution.json']) as SolutionFile).summary;
  await between('the reference solve');

  progress.update('2/3 training a warm-started network (short budget)', true);
  const trainConfig = parseOrThrow(trainConfigSchema, { ...DEMO_TRAIN_CONFIG, backend: flags.backend }, 'demo train config');
  const netDir = join(flags.out, 'network');
  const { trainRun, TrainingStopped } = await import('../../training/train-run.js');
  const tr = await trainRun({
    config: trainConfig,
    outDir: netDir,
    shouldStop: stopRequested,
    ...trainProgressHooks(progress, trainConfig),
  }).catch((e) => {
    throw e instanceof TrainingStopped && e.reason === 'interrupted' ? stopped(`the reference and part of the training (${e.message})`) : e;
  });
  await between('the reference and the training');
  progress.update('3/4 report of the network', true);
  const netReport = report(netDir, join(netDir, 'report'));

  // A "measured" profile: the reference at χN = 15 sampled at 64 points over two
  // periods, from an arbitrary origin, with 2 % Gaussian noise (seeded).
  progress.update('4/4 synthetic noisy profile and inversion for χN', true);
  const invDir = join(flags.out, 'inversion');
  const truth = { chiN: DEMO_SYSTEM.chiN, noise: 0.02, points: 64, periods: 2, offset: 1.3, seed: 2026 };
  const chainSpec = config.system.chain;
  const synth = synthesize({ chain: chainSpec, chiN: truth.chiN, points: truth.points, noise: truth.noise, seed: truth.seed, periods: truth.periods, offset: truth.offset, period: 'equilibrium', resolution: 0, nx: 64, ns: 100 });
  const csv = synthCsv(synth, truth.noise);
  const data = parseProfileCsv(csv, join(invDir, 'profile.csv'));
  await between('the reference and the training');
  const est = estimateClassical(data, { chain: chainSpec, nx: 64, ns: 100, period: { mode: 'equilibrium' }, resolution: 0, profilePoints: 12 });
  await between('the reference, the training and the classical inversion');
  // The network estimator beside it: one seed of the default (least-squares) strategy, started from the classical estimate.
  const { estimateNetwork } = await import('../../inverse/network-estimator.js');
  const ne = await estimateNetwork(data, est, {
    chain: chainSpec,
    seeds: [1],
    steps: 0,
    strategy: 'least-squares',
    resolution: 0,
    backend: trainConfig.backend,
    onProgress: (_seed, step, steps, chiN) => progress.update(`network estimator: step ${step}/${steps}, χN = ${chiN.toPrecision(6)}`),
  });
  const vsTruth = compareWithTruth('the demo scenario', truth.chiN, chainSpec, est, ne);
  const result = inversionResult(data, { kind: 'invert', demo: true, truth }, provenance(), { classical: classicalBlock(est, data), network: networkBlock(ne, est, data) }, vsTruth);
  out.write({
    'inversion/profile.csv': csv,
    'inversion/truth.json': formatText(synthTruthSchema, {
      kind: 'synth-truth',
      version: SYNTH_TRUTH_VERSION,
      provenance: provenance(),
      chain: chainSpec,
      f: DEMO_SYSTEM.chain.f,
      ...truth,
      period: synth.period,
      periodMode: 'equilibrium',
      resolution: 0,
      nx: 64,
      ns: 100,
      xUnits: 'Rg',
      freeEnergy: synth.point.solution.freeEnergy,
      note: 'the demo scenario; lengths (period, offset) in Rg; offset is the data position of the centre of an A-rich domain',
    }),
    'inversion/result.json': inversionResultText(result),
    'inversion/fit.csv': fitCsv(data, est),
    'inversion/solution.json': solutionText(solutionToFile(est.solution, provenance(), { kind: 'invert', demo: true })),
  });
  const invReport = report(invDir, join(invDir, 'report'));
  const m = tr.metrics;
  progress.done(`finished in ${formatDuration((performance.now() - t0) / 1000)}`);
  process.stdout.write(
    [
      `demo: symmetric diblock, χN = ${s.chiN}`,
      `  reference: ${phaseLabel(s.phase)}, period ${formatNumber(s.period, 6)} Rg, F = ${formatNumber(s.freeEnergy, 9)} kT/chain (disordered ${formatNumber(s.freeEnergyDisordered, 9)})`,
      `  network (${m.backend}, ${[...(m.training.adamSteps > 0 ? [`${m.training.adamSteps} Adam steps`] : []), ...(m.training.lbfgs ? [`${m.training.lbfgs.iterations} L-BFGS iterations`] : []), ...(m.training.secondOrder ? [`${m.training.secondOrder.iterations} second-order (Levenberg–Marquardt) iterations`] : [])].join(' + ')} after a ${m.training.warmStart?.adamSteps ?? 0}-step warm start, ${formatDuration(m.training.seconds)}): φA relative L2 error ${m.errors.phiA.relativeL2.toExponential(2)}, F error ${m.errors.freeEnergyError.toExponential(2)} kT/chain`,
      `  wrote ${refDir}/ (solution.json, profile.csv, report/) and ${netDir}/ (checkpoint, metrics.json, report/)`,
      `  inversion of a synthetic 2 % noise profile (true χN = ${truth.chiN}): classical χN = ${est.chiN.toFixed(3)}, 68.3 % interval [${est.interval[0].toFixed(3)}, ${est.interval[1].toFixed(3)}], 95 % [${est.interval95[0].toFixed(3)}, ${est.interval95[1].toFixed(3)}]; network χN = ${ne.chiN.toFixed(3)} (one seed, ${ne.seconds.toFixed(0)} s; discovered wA − wB within ${vsTruth.estimators.network.exchangeFieldRelativeL2!.toExponential(1)} of the truth) → ${invDir}/`,
      `  reports: ${[...refReport, ...netReport, ...invReport].filter((p) => p.endsWith('.pdf')).join(', ')}`,
    ].join('\n') + '\n',
  );
}

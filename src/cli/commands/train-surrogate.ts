/** `mesofield train CONFIG` for a config of kind "surrogate": a thin layer over surrogate/surrogate-run.ts. */
import { basename, join } from 'node:path';
import { InputError, parseOrThrow } from '../../io/errors.js';
import { surrogateConfigSchema } from '../../io/schemas/surrogate-config.js';
import type { SurrogateMetrics, surrogateRun as SurrogateRun } from '../../surrogate/surrogate-run.js';
import type { SurrogateConfig } from '../../io/schemas/surrogate-config.js';
import { claimOut, withOutput } from '../run-output.js';
import { formatDuration, Progress, RunProgress } from '../progress.js';
import { installStopHandlers } from '../../runtime/stop.js';
import type { TrainFlags } from './train-flags.js';
import { backendFlag } from './train-flags.js';
import { PARAMETER_LABELS } from '../../surrogate/parameter-space.js';
import type { ParameterName } from '../../surrogate/parameter-space.js';

const sci = (v: number) => (Number.isFinite(v) ? v.toExponential(2) : String(v));

function rangeText(m: SurrogateMetrics): string {
  const names = (k: string) => PARAMETER_LABELS[k as ParameterName]?.symbol ?? k;
  const varying = m.parameters.map((a) => `${names(a.name)} in [${a.min}, ${a.max}] (${a.anchors} anchors)`);
  const fixed = Object.entries(m.fixed).map(([k, v]) => `${names(k)} = ${v}`);
  return [...varying, ...fixed].join(', ');
}

function summaryLines(m: SurrogateMetrics, outDir: string | undefined): string[] {
  const e = m.errors;
  const t = m.timing;
  return [
    `trained surrogate over ${rangeText(m)} on ${m.backend} (tfjs ${m.tfjs}): ${m.training.fit.points} reference solutions fitted (${t.extraSolves.count} extra${t.adaptiveSolves ? `, ${t.adaptiveSolves.count} adaptive where the first fit's SCFT residual was largest` : ''})${m.training.fit.method === 'levenberg-marquardt' ? ` by Levenberg–Marquardt (${m.training.fit.lmIterations}${t.adaptiveSolves ? ' + continued' : ''} iterations, fit loss ${sci(m.training.fit.finalLoss)})` : ''}, ${m.training.rounds} physics rounds`,
    `held-out (${e.points} points): φA relative L2 max ${sci(e.phiARelativeL2.max)} (mean ${sci(e.phiARelativeL2.mean)}), |F error| max ${sci(e.freeEnergyError.max)} kT/chain, period error max ${sci(e.periodRelativeError.max)}`,
    `baseline, the anchors' reference profiles interpolated (no network): φA relative L2 max ${sci(e.anchorInterpolationPhiA.max)} (mean ${sci(e.anchorInterpolationPhiA.mean)})`,
    `query ${(1000 * t.querySeconds).toFixed(2)} ms after start-up against ${(1000 * t.referenceSolveSeconds).toFixed(0)} ms for one reference solve at the equilibrium period (×${t.speedup.toFixed(0)}); building took ${t.buildSeconds.toFixed(1)} s = ${t.equivalentReferenceSolves.toFixed(1)} reference solves`,
    ...(outDir ? [`checkpoint ${outDir} (checkpoint.json, weights.bin, metrics.json; reference.json and network.json at the worst held-out point)`] : []),
  ];
}

export async function trainSurrogate(configPath: string, raw: unknown, flags: TrainFlags): Promise<number | void> {
  if (flags.resume !== undefined) throw new InputError(`--resume: got ${JSON.stringify(flags.resume)}; a surrogate run cannot be resumed (it is short): run it again`);
  if (flags.adamSteps !== undefined) throw new InputError(`--adam-steps: got ${JSON.stringify(flags.adamSteps)}; a surrogate's Adam steps are warmStart.adamSteps in ${configPath} (its physics training is training.rounds)`);
  if (flags.lbfgsIterations !== undefined) throw new InputError(`--lbfgs-iterations: got ${JSON.stringify(flags.lbfgsIterations)}; a surrogate's L-BFGS iterations are warmStart.lbfgsIterations in ${configPath}`);
  const config = parseOrThrow(surrogateConfigSchema, raw, configPath);
  backendFlag(flags.backend); // checked before the output directory is claimed
  const outDir = flags.out ?? join('checkpoints', basename(configPath).replace(/(\.surrogate)?\.json$/, ''));
  // Claimed before any work (io/output-directory.ts): new, empty or a previous surrogate output; marker and lock.
  const out = claimOut({ out: outDir, overwrite: flags.overwrite }, SURROGATE_OUTPUT);
  const progress = new Progress('train', flags.quiet);
  const { surrogateRun } = await import('../../surrogate/surrogate-run.js');
  const uninstall = installStopHandlers('train', 'stopping after this solve or step; a surrogate run is not resumable and saves nothing');
  return withOutput(out, () => runAndReport(config, outDir, flags, progress, surrogateRun)).finally(uninstall);
}

/** What `out` holds: a surrogate checkpoint, told apart from a network run's (`train`). */
export const SURROGATE_OUTPUT = 'train (surrogate)';

async function runAndReport(config: SurrogateConfig, outDir: string, flags: TrainFlags, progress: Progress, surrogateRun: typeof SurrogateRun): Promise<number | void> {
  const backend = backendFlag(flags.backend);
  // The run's counted phases (the network fit between them reports once, when it ends).
  const run = new RunProgress(progress, [
    { name: 'reference solves', units: 0, unit: 'solves' },
    { name: 'physics rounds', units: config.training.rounds, unit: 'rounds' },
  ]);
  run.begin('reference solves');
  let fitStart: number | undefined;
  // The continued fit after the adaptive solves counts its own iterations (warmStart.adaptiveIterations).
  let refit = false;
  const r = await surrogateRun({
    config,
    outDir,
    backend,
    onStage: (m) => {
      // The fit starts right after its stage line: its rate counts from here.
      if (m.startsWith('fitting the field network')) fitStart = performance.now();
      if (m.startsWith('continuing the fit')) {
        refit = true;
        fitStart = performance.now();
      }
      progress.update(m, true);
    },
    onSolve: (done, total, role, seconds) => {
      run.size('reference solves', total);
      run.at('reference solves', done, `${role}, ${seconds.toFixed(2)} s`, done === total);
    },
    onFitStep: (step, loss) => {
      fitStart ??= performance.now();
      const lm = config.warmStart.method === 'levenberg-marquardt';
      if (!lm && step % 100 !== 0) return;
      const total = refit ? config.warmStart.adaptiveIterations : lm ? config.warmStart.lmIterations : config.warmStart.adamSteps + config.warmStart.lbfgsIterations;
      const perStep = (performance.now() - fitStart) / 1000 / step;
      // At most `total` steps (LM and L-BFGS may stop early): the time left is an upper estimate.
      progress.update(`${refit ? 'fit continued after the adaptive solves' : 'fit to the reference solutions'}: ${lm ? 'LM iteration' : 'step'} ${step}/${total} | fit loss ${sci(loss)} | ${(1 / perStep).toFixed(2)} ${lm ? 'iterations' : 'steps'}/s | ≤ ${formatDuration(perStep * Math.max(0, total - step))} left`);
    },
    onRound: (h) => {
      if (h.round === 0) {
        progress.update(`fit to the reference solutions: fit loss ${sci(h.fitLoss)}${h.phiError !== undefined ? ` | held-out φA error ${sci(h.phiError)}` : ''}`, true);
        run.begin('physics rounds');
        return;
      }
      run.at('physics rounds', h.round, `SCFT residual ${h.residual === null ? 'n/a' : sci(h.residual)} kT | fit loss ${sci(h.fitLoss)}${h.phiError !== undefined ? ` | held-out φA error ${sci(h.phiError)}` : ''}`, h.round === h.rounds || h.phiError !== undefined);
    },
  });
  try {
    const m = r.metrics;
    progress.done(`surrogate trained in ${formatDuration(m.timing.buildSeconds)} on ${m.backend}; checkpoint in ${outDir}`);
    process.stdout.write(flags.json ? `${JSON.stringify({ checkpoint: outDir, ...m }, null, 2)}\n` : `${summaryLines(m, outDir).join('\n')}\n`);
    // A signal while the report is drawn stops it; the checkpoint stays (cli/report-after-run.ts).
    if (flags.report) return (await import('../report-after-run.js')).reportAfterRun('train', outDir, 'the checkpoint', flags.quiet);
  } finally {
    r.model.dispose();
  }
}

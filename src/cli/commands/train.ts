/** `mesofield train` and `mesofield evaluate`: thin wrappers over training/train-run.ts. */
import type { Command } from 'commander';
import { basename, dirname, isAbsolute, join, resolve } from 'node:path';
import { InputError, RunFailure, asInputError, parseOrThrow } from '../../io/errors.js';
import { formatNumber } from '../../io/number-format.js';
import { readJsonObject } from '../../io/load-json.js';
import { installStopHandlers, RunStopped, stopExitCode, stopRequested } from '../../runtime/stop.js';
import { EXIT } from '../exit-codes.js';
import { claimOut } from '../run-output.js';
import { trainConfigSchema } from '../../io/schemas/train-config.js';
import { formatDuration, Progress } from '../progress.js';
import { formatLoss, trainProgressHooks } from '../train-progress.js';
import { backendFlag } from './train-flags.js';
import type { TrainFlags } from './train-flags.js';
import { action, numberFlag } from '../run-command.js';
import type { TransferReport } from '../../training/train-run.js';
import { checkpointKind } from '../../io/checkpoint-kind.js';

const fmt = formatLoss;

/** Steps and time a transfer took to its target, and what it saved against a warm start. */
function transferLines(t: TransferReport, from: string): string[] {
  const reach = (r: { adamSteps: number; seconds: number } | null | undefined, what: string) =>
    r ? `φA error < ${t.targetPhiError} at step ${r.adamSteps} (${r.seconds.toFixed(1)} s ${what})` : `φA error < ${t.targetPhiError} not reached`;
  const lines = [`transfer from ${from}: ${reach(t.transfer, 'of training')}`];
  const b = t.baseline;
  if (b) {
    const ws = `with its ${b.warmStartAdamSteps}-step warm start, ${b.warmStartSeconds.toFixed(1)} s`;
    lines.push(`warm-start baseline: ${b.reached ? reach(b, ws) : `φA error < ${t.targetPhiError} not reached in ${b.adamSteps} steps (${b.seconds.toFixed(1)} s ${ws}; it ended at ${fmt(b.finalPhiError)})`}`);
    const s = t.saved;
    lines.push(s ? `saved by the transfer: ${s.lowerBound ? 'at least ' : ''}${s.adamSteps} steps, ${s.seconds.toFixed(1)} s` : 'saved by the transfer: not measured (the transfer did not reach the target)');
  }
  return lines;
}

export function registerTrain(program: Command): void {
  program
    .command('train')
    .description('train a physics-informed network for one system and check it against the spectral reference')
    .argument('<config>', 'train config JSON (kind "train", or "surrogate" for a network over a parameter range)')
    .option('--out <dir>', 'checkpoint directory (default checkpoints/<config name>)')
    .option('--resume <dir>', 'continue the run saved in this checkpoint directory')
    .option('--overwrite', 'replace a previous train output in --out (only the files mesofield wrote there)')
    .option('--backend <b>', 'tfjs backend: auto | native | wasm | cpu')
    .option('--adam-steps <n>', 'Adam steps of physics training (training.adamSteps)')
    .option('--lbfgs-iterations <n>', 'L-BFGS iterations after the Adam steps (training.lbfgsIterations)')
    .option('--json', 'print the metrics as JSON on stdout')
    .option('--report', 'also write a PDF/PNG report of the run into <out>/report')
    .option('--quiet', 'no progress on stderr')
    .action(
      action(async (configPath: string, flags: TrainFlags) => {
        const raw = readJsonObject(configPath);
        // Paths in a config are read relative to the config file's folder (it works from any working directory).
        if (typeof raw.initFrom === 'string' && raw.initFrom !== '' && !isAbsolute(raw.initFrom)) raw.initFrom = resolve(dirname(configPath), raw.initFrom);
        if ((raw as { kind?: unknown } | null)?.kind === 'surrogate') {
          const { trainSurrogate } = await import('./train-surrogate.js');
          return trainSurrogate(configPath, raw, flags);
        }
        let config = parseOrThrow(trainConfigSchema, raw, configPath);
        for (const [flag, key, value] of [['--adam-steps', 'adamSteps', flags.adamSteps], ['--lbfgs-iterations', 'lbfgsIterations', flags.lbfgsIterations]] as const) {
          const n = numberFlag(flag, value);
          if (n === undefined) continue;
          if (!Number.isInteger(n) || n < 0) throw new InputError(`${flag}: got ${formatNumber(n)}; allowed: a whole number ≥ 0`);
          config = { ...config, training: { ...config.training, [key]: n } };
        }
        const backend = backendFlag(flags.backend);
        const outDir = flags.out ?? flags.resume ?? join('checkpoints', basename(configPath).replace(/(\.train)?\.json$/, ''));
        const out = claimOut({ out: outDir, overwrite: flags.overwrite }, 'train', { continuePrevious: flags.resume !== undefined && resolve(flags.resume) === resolve(outDir) });
        const progress = new Progress('train', flags.quiet);
        const uninstall = installStopHandlers('train');
        const { trainRun, TrainingStopped } = await import('../../training/train-run.js');
        try {
          const r = await trainRun({
            config,
            outDir,
            resumeDir: flags.resume,
            backend,
            shouldStop: stopRequested,
            ...trainProgressHooks(progress, config, flags.resume !== undefined),
          });
          const m = r.metrics;
          const so = m.training.secondOrder;
          const polish = `${m.training.lbfgs ? ` and ${m.training.lbfgs.iterations} L-BFGS iterations` : ''}${so ? ` and ${so.iterations} second-order iterations` : ''}`;
          const h = m.training.holds;
          const holds = !h ? '' : `the networks hold the ${h.stage} state at step ${h.step}${h.lbfgsIterations !== undefined ? `, L-BFGS iteration ${h.lbfgsIterations}` : ''}${h.secondOrderIterations !== undefined ? `, second-order iteration ${h.secondOrderIterations}` : ''} (${h.chosenBy === 'last' ? 'the last state: no reference error was measured during training' : 'the lowest reference error measured'})`;
          progress.done(`${m.training.message}${polish} in ${formatDuration(m.training.seconds)} on ${m.backend}; checkpoint in ${outDir}`);
          if (flags.json) process.stdout.write(`${JSON.stringify({ checkpoint: outDir, ...m }, null, 2)}\n`);
          else {
            process.stdout.write(
              [
                `trained ${m.reference.chain}, χN = ${m.reference.chiN}, ${m.reference.periods === 0 ? `film of thickness ${formatNumber(m.reference.length, 6)} Rg` : `period ${formatNumber(m.reference.period, 6)} Rg`} on ${m.backend} (tfjs ${m.tfjs})${m.sharedPropagator ? ', one propagator network for q and q†' : ''}`,
                `φA relative L2 error ${fmt(m.errors.phiA.relativeL2)} (max ${fmt(m.errors.phiA.maxError)}), wA − wB relative L2 ${fmt(m.errors.exchangeField.relativeL2)}`,
                `Q relative error ${fmt(m.errors.QRelativeError)}, F error ${fmt(m.errors.freeEnergyError)} kT/chain (network ${m.network.freeEnergy.toFixed(6)}, reference ${m.reference.freeEnergy.toFixed(6)})`,
                ...(m.training.transfer ? transferLines(m.training.transfer, m.training.transferredFrom!.checkpoint) : []),
                holds,
                ...m.verdict.warnings.map((w) => `warning: ${w}`),
                `phase: ${m.phase}${m.verdict.ok ? '' : ` (the network's own φA would say ${m.networkPhase}; not confirmed against the reference)`}`,
                `checkpoint ${outDir} (metrics.json, network.json, reference.json)`,
              ].join('\n') + '\n',
            );
          }
          // The run's own stop handler stays installed under the report's (they nest): a signal
          // now stops the report, not the finished training.
          const stopCode = flags.report ? await (await import('../report-after-run.js')).reportAfterRun('train', outDir, 'the checkpoint', flags.quiet) : undefined;
          out?.finish();
          if (stopCode !== undefined) return stopCode;
          if (flags.json) for (const w of m.verdict.warnings) process.stderr.write(`train: warning: ${w}\n`);
          if (m.verdict.aboveTarget) throw new RunFailure(`the run ended above its target: ${m.verdict.warnings[0]} (checkpoint ${outDir} holds it)`);
          if (m.collapsed) throw new RunFailure('the network collapsed to the disordered state (φA is flat); start from the spectral solution (warmStart.type "reference")');
        } catch (e) {
          // A stopped run keeps what it wrote (the last good checkpoint) as its output; anything else only drops the lock.
          // One stopped before its first checkpoint (in the warm start) wrote nothing: the folder is left as it was.
          // A report stopped by a signal (RunStopped) leaves the finished checkpoint: marked incomplete, its report missing.
          if ((e instanceof TrainingStopped && e.lastCheckpointStep !== null) || e instanceof RunStopped) out?.finish(false);
          else out?.abandon();
          if (e instanceof TrainingStopped) {
            process.stderr.write(`train: ${e.message}\n`);
            return e.reason === 'interrupted' ? stopExitCode() : EXIT.runFailed;
          }
          throw asInputError(e, configPath);
        } finally {
          uninstall();
        }
      }),
    );

  program
    .command('evaluate')
    .description('metrics of a saved network against a fresh spectral reference')
    .argument('<checkpoint>', 'checkpoint directory written by train')
    .option('--backend <b>', 'tfjs backend: auto | native | wasm | cpu')
    .option('--json', 'print the metrics as JSON on stdout')
    .option('--quiet', 'no messages on stderr')
    .action(
      action(async (dir: string, flags: { backend?: string; json?: boolean; quiet?: boolean }) => {
        if (checkpointKind(dir) === 'surrogate-checkpoint') {
          throw new InputError(`${dir}: a surrogate checkpoint; its error map against fresh reference solves is in ${join(dir, 'metrics.json')} (mesofield report ${dir} draws it); mesofield predict ${dir} --chiN X answers at a point`);
        }
        const { evaluateCheckpoint } = await import('../../training/evaluate-checkpoint.js');
        const ev = await evaluateCheckpoint(dir, backendFlag(flags.backend));
        const out = {
          checkpoint: ev.checkpoint,
          backend: ev.backend,
          tfjs: ev.tfjs,
          trainedOn: ev.trainedOn,
          step: ev.step,
          phase: ev.phase,
          phiA: ev.errors.phiA,
          exchangeField: ev.errors.exchangeField,
          QRelativeError: ev.errors.QRelativeError,
          freeEnergyError: ev.errors.freeEnergyError,
          freshResiduals: ev.freshResiduals,
          reference: ev.reference,
          network: ev.network,
        };
        if (flags.json) process.stdout.write(`${JSON.stringify(out, null, 2)}\n`);
        else
          process.stdout.write(
            [
              `${dir}: step ${ev.step}, ${ev.phase}, evaluated on ${ev.backend} (trained on ${ev.trainedOn.backend})`,
              `φA relative L2 ${fmt(ev.errors.phiA.relativeL2)}, max ${fmt(ev.errors.phiA.maxError)}; wA − wB relative L2 ${fmt(ev.errors.exchangeField.relativeL2)}, max ${fmt(ev.errors.exchangeField.maxError)} kT`,
              `Q relative error ${fmt(ev.errors.QRelativeError)}; F error ${fmt(ev.errors.freeEnergyError)} kT/chain`,
              `residuals on 1024 fresh points: ${Object.entries(ev.freshResiduals).map(([k, v]) => `${k} ${fmt(v)}`).join(', ')}`,
            ].join('\n') + '\n',
          );
      }),
    );
}

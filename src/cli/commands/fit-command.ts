/**
 * What fit-bragg and fit-spacing share: the chain and model-grid flags over their config
 * (through ConfigInput, so messages name the flag or the config key); and what every
 * measurement command (fit-bragg, fit-spacing, fit-scattering, bragg-pattern) shares: the
 * output of a finished run (its files, built through their formats, and the report).
 */
import { join } from 'node:path';
import type { OutputDirectory } from '../../io/output-directory.js';
import type { ReportDocument } from '../../reports/document.js';
import { InputError } from '../../io/errors.js';
import type { MeasurementFitStep, MeasurementFitTask } from '../../inverse/measurement-fit-worker.js';
import { ConfigInput } from '../config-input.js';

export interface FitCommandFlags {
  f?: string;
  segmentRatio?: string;
  nx?: string;
  ns?: string;
  json?: boolean;
  out?: string;
  overwrite?: boolean;
  report?: boolean;
  quiet?: boolean;
}

type FitCommand = 'fit-bragg' | 'fit-spacing';

/** The config (file, or an empty diblock config) with the chain and grid flags on top. */
export function fitConfigInput<C extends FitCommand>(command: C, configPath: string | undefined, flags: FitCommandFlags): ConfigInput<C> {
  if (flags.report && !flags.out) throw new InputError('--report: needs --out DIR (the report is written into DIR/report)');
  const input = new ConfigInput<C>(command, configPath, { version: 2, kind: command, system: { chain: { type: 'diblock' } } });
  const chain = input.get('system.chain');
  if (chain && typeof chain === 'object' && (chain as Record<string, unknown>).type === undefined) (chain as Record<string, unknown>).type = 'diblock';
  // Both commands map these four flags to the same keys (FLAG_CONFIG_PATHS).
  const shared = input as unknown as ConfigInput<'fit-spacing'>;
  const f = shared.number('--f', flags.f);
  if (!configPath && f === undefined) throw new InputError('--f: missing; the A fraction f of the chain is required (or a CONFIG file with system.chain)');
  shared.number('--segment-ratio', flags.segmentRatio);
  shared.number('--nx', flags.nx);
  shared.number('--ns', flags.ns);
  return input;
}

/** The run's files (name → text, from io/formats) into the claimed --out, and the report beside them when asked (the report code loads only then); what was written goes to stderr. */
export async function writeFitOutput(command: string, out: OutputDirectory | undefined, flags: Pick<FitCommandFlags, 'out' | 'report' | 'quiet'>, files: Record<string, string>, report: () => Promise<ReportDocument>): Promise<void> {
  if (!out) return;
  const written = out.write(files);
  if (!flags.quiet) process.stderr.write(`${command}: wrote ${written.join(', ')}\n`);
  if (!flags.report) return;
  const { renderReport, writeReportFiles } = await import('../../reports/write-report.js');
  const reportFiles = writeReportFiles(join(flags.out!, 'report'), renderReport(await report(), ['pdf', 'png'], 150));
  if (!flags.quiet) process.stderr.write(`${command}: wrote ${reportFiles.join(', ')}\n`);
}

/**
 * The fit on a worker thread (inverse/measurement-fit-worker.ts): SIGINT/SIGTERM end it at
 * once with 130/143, nothing written (a previous output in --out stays as it was).
 */
export async function measurementFitOnWorker<R>(command: FitCommand, task: MeasurementFitTask, outDir: string | undefined, onStep: (s: MeasurementFitStep) => void): Promise<R> {
  const { runInWorkers, PoolStopped } = await import('../../threads/worker-pool.js');
  const { errorFromWorker } = await import('../worker-errors.js');
  const { installStopHandlers, stopAbortSignal, RunStopped } = await import('../../runtime/stop.js');
  const uninstall = installStopHandlers(command, `stopping the fit; nothing will be written${outDir ? ` (${outDir} is left as it was)` : ''}`);
  try {
    const [r] = await runInWorkers<MeasurementFitTask, R, MeasurementFitStep>([task], { entry: 'inverse/measurement-fit-worker.js', workerData: null, workers: 1, onProgress: onStep, toError: errorFromWorker, signal: stopAbortSignal() });
    return r;
  } catch (e) {
    if (e instanceof PoolStopped) throw new RunStopped(`${command} stopped by a signal during the fit; nothing was written${outDir ? ` (${outDir} was left as it was)` : ''}`);
    throw e;
  } finally {
    uninstall();
  }
}

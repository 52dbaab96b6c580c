/** `mesofield invert`: recover χN (and the fields) from a measured composition profile; a thin layer over inverse/invert-run.ts. */
import type { Command } from 'commander';
import type { OutputDirectory } from '../../io/output-directory.js';
import { claimOut, withOutput } from '../run-output.js';
import { InputError } from '../../io/errors.js';
import { invertConfigSchema, NETWORK_STRATEGY_KEYS } from '../../io/schemas/invert-config.js';
import type { InvertConfig } from '../../io/schemas/invert-config.js';
import { inversionResultText, summaryText } from '../../inverse/inversion-result.js';
import { parseDecimal } from '../decimal-text.js';
import { action, workersFlag } from '../run-command.js';
import { ConfigInput } from '../config-input.js';
import { Progress, RunProgress } from '../progress.js';
import type { InvertRunResult } from '../../inverse/invert-run.js';
import type { InvertPhaseName } from '../../inverse/invert-task.js';
import type { InvertStep, InvertTask } from '../../inverse/invert-worker.js';

interface InvertFlags {
  f?: string;
  method?: string;
  period?: string;
  chiNRange?: string;
  json?: boolean;
  out?: string;
  overwrite?: boolean;
  rgNm?: string;
  rgNmSd?: string;
  fSd?: string;
  segmentRatioSd?: string;
  segments?: string;
  segmentLengthNm?: string;
  resolution?: string;
  nx?: string;
  ns?: string;
  profilePoints?: string;
  seeds?: string;
  workers?: string;
  strategy?: string;
  adamSteps?: string;
  lbfgsIterations?: string;
  backend?: string;
  report?: boolean;
  quiet?: boolean;
  film?: string;
  thicknessStart?: string;
  affinity?: string;
  affinityRange?: string;
  sld?: string;
  wallRange?: string;
  intervals?: string;
}

function chiNRangeFlag(value: string | undefined): [number, number] | undefined {
  if (value === undefined) return undefined;
  const parts = value.split(',').map((s) => s.trim());
  const nums = parts.map((p) => parseDecimal('--chiN-range', p));
  if (parts.length !== 2 || nums.some((v) => typeof v === 'string')) {
    throw new InputError(`--chiN-range: got ${JSON.stringify(value)}; allowed: two numbers lo,hi (e.g. 11,40)`);
  }
  if (!((nums[0] as number) > 0 && (nums[0] as number) < (nums[1] as number))) throw new InputError(`--chiN-range: got ${JSON.stringify(value)}; allowed: 0 < lo < hi`);
  return [nums[0] as number, nums[1] as number];
}

/** Flags on top of the config file (or of an empty diblock config); messages name the flag or the file's key. */
export function buildInvertConfig(configPath: string | undefined, flags: InvertFlags): { config: InvertConfig; sources: Record<string, string> } {
  const input = new ConfigInput('invert', configPath, { version: 2, kind: 'invert', system: { chain: { type: 'diblock' } } });
  const fromFile = (key: string, flag: string) => (configPath && input.get(key) !== undefined ? `${configPath}: ${key}` : flag);
  const sources: Record<string, string> = { method: fromFile('method', '--method'), period: fromFile('cell.period', '--period'), chiNRange: fromFile('chiNRange', '--chiN-range') };
  const chain = input.get('system.chain');
  if (chain && typeof chain === 'object' && (chain as Record<string, unknown>).type === undefined) (chain as Record<string, unknown>).type = 'diblock';
  const f = input.number('--f', flags.f);
  if (!configPath && f === undefined) throw new InputError('--f: missing; the A fraction f of the chain is required (or a CONFIG file with system.chain)');
  input.number('--seeds', flags.seeds);
  if (flags.strategy !== undefined) input.set('--strategy', flags.strategy);
  input.number('--adam-steps', flags.adamSteps);
  input.number('--lbfgs-iterations', flags.lbfgsIterations);
  if (flags.backend !== undefined) input.set('--backend', flags.backend);
  if (flags.method !== undefined) {
    input.set('--method', flags.method);
    sources.method = '--method';
  }
  if (flags.period !== undefined) {
    input.period('--period', flags.period, ['free']);
    sources.period = '--period';
  }
  const range = chiNRangeFlag(flags.chiNRange);
  if (range) {
    input.set('--chiN-range', range);
    sources.chiNRange = '--chiN-range';
  }
  input.number('--resolution', flags.resolution);
  input.number('--nx', flags.nx);
  input.number('--ns', flags.ns);
  input.number('--profile-points', flags.profilePoints);
  // Unit flags replace the config's units block as a whole (one way to say what x is in).
  if (flags.rgNm !== undefined || flags.rgNmSd !== undefined || flags.segments !== undefined || flags.segmentLengthNm !== undefined) input.reset('units');
  input.number('--rg-nm', flags.rgNm);
  input.number('--segments', flags.segments);
  input.number('--segment-length-nm', flags.segmentLengthNm);
  input.number('--rg-nm-sd', flags.rgNmSd);
  input.number('--f-sd', flags.fSd);
  input.number('--segment-ratio-sd', flags.segmentRatioSd);
  // Where each assumed input's uncertainty came from (named in messages about it).
  sources['sd.rgNm'] = flags.rgNmSd !== undefined ? '--rg-nm-sd' : `${configPath ?? 'flags'}: units.rgNmSd`;
  sources['sd.f'] = flags.fSd !== undefined ? '--f-sd' : `${configPath ?? 'flags'}: uncertainty.f`;
  sources['sd.segmentRatio'] = flags.segmentRatioSd !== undefined ? '--segment-ratio-sd' : `${configPath ?? 'flags'}: uncertainty.segmentRatio`;
  const config = input.parse(invertConfigSchema);
  // A budget of the strategy not run would be silently ignored: refuse it, naming where it came from.
  const strategy = config.network.strategy;
  for (const [other, keys] of Object.entries(NETWORK_STRATEGY_KEYS)) {
    if (other === strategy) continue;
    for (const key of keys) {
      const value = input.get(`network.${key}`);
      if (value === undefined) continue;
      throw new InputError(`${input.origin(`network.${key}`)}: got ${JSON.stringify(value)}; allowed only with network.strategy "${other}", and this run's strategy is "${strategy}"${input.get('network.strategy') === undefined ? ' (the default; choose the other with --strategy or network.strategy)' : ''}`);
    }
  }
  return { config, sources };
}

export function registerInvert(program: Command): void {
  program
    .command('invert')
    .description('recover χN (with profile-likelihood intervals) and the self-consistent fields from a measured composition profile')
    .argument('<profile>', 'CSV with a header row: x, phiA and optionally sigma (per-point standard deviation)')
    .argument('[config]', 'invert config JSON (kind "invert"); flags override it')
    .option('--f <f>', 'A fraction of the diblock (required without a config)')
    .option('--method <m>', 'classical | network | both')
    .option('--seeds <n>', 'network: independent seeded trainings (their spread is reported)')
    .option('--workers <k>', 'network: worker threads training seeds at once (default: min(2, cores))')
    .option('--strategy <s>', 'network: least-squares (default: χN in one Levenberg–Marquardt problem with the networks) | adam-lbfgs')
    .option('--adam-steps <n>', 'network, strategy adam-lbfgs: Adam steps per seed (network.adamSteps)')
    .option('--lbfgs-iterations <n>', 'network, strategy adam-lbfgs: L-BFGS iterations per seed after the Adam steps (network.lbfgsIterations)')
    .option('--backend <b>', 'network: tfjs backend auto | native | wasm | cpu')
    .option('--period <mode>', 'equilibrium (stress-free at each χN, default) | free (fitted) | L (given, in the units of x)')
    .option('--chiN-range <lo,hi>', 'χN search range (default 1.01 × the spinodal χN to 60)')
    .option('--resolution <W>', 'Gaussian instrument resolution (standard deviation, units of x)')
    .option('--rg-nm <R>', 'x is in nm and Rg = R nm')
    .option('--rg-nm-sd <S>', 'standard deviation of Rg in nm: profiled into the χN interval')
    .option('--f-sd <S>', 'standard deviation of f: profiled into the χN interval (two extra fits at f ± S)')
    .option('--segment-ratio-sd <S>', 'standard deviation of b_A/b_B: profiled into the χN interval (two extra fits)')
    .option('--segments <N>', 'x is in nm; with --segment-length-nm, Rg = b·sqrt(N/6)')
    .option('--segment-length-nm <b>', 'statistical segment length in nm (with --segments)')
    .option('--nx <n>', 'model grid points per period (power of two; default 64)')
    .option('--ns <n>', 'model contour steps (default 100)')
    .option('--profile-points <k>', 'extra points on the profile-likelihood curve (default 9)')
    .option('--json', 'print the result JSON on stdout')
    .option('--out <dir>', 'write result.json, fit.csv and solution.json into this directory')
    .option('--overwrite', 'replace a previous invert output in --out (only the files mesofield wrote there)')
    .option('--report', 'also write a PDF/PNG report into <out>/report (needs --out)')
    .option('--quiet', 'no progress on stderr')
    .option('--film <H|fit>', 'the profile is a depth profile through a film of thickness H (units of x), or "fit"; CSV x,phiA[,sigma] or x,sld[,sigma]')
    .option('--thickness-start <H>', 'film: starting thickness (units of x) when --film fit')
    .option('--affinity <b,t>', 'film: starting wall affinities for A, bottom and top (default: both signs tried)')
    .option('--affinity-range <lo,hi>', 'film: affinity search range (default -5,5)')
    .option('--sld <a,b,sub,med>', 'film, SLD profile: SLDs of A, B, the substrate and the medium, 10⁻⁶ Å⁻²')
    .option('--wall-range <l>', "film: range of the walls' surface field, Rg (default 0.25)")
    .option('--intervals <list>', 'film: parameters with profile-likelihood intervals: chiN (default), bottom, top (slow), comma-separated, or none')
    .action(
      action(async (profilePath: string, configPath: string | undefined, flags: InvertFlags) => {
        if (flags.film !== undefined) {
          // A film's depth profile: the film fit (its own config kind, "film-fit").
          const { buildFilmFitConfig, runFilmFitCommand } = await import('./film-fit-command.js');
          const config = buildFilmFitConfig(configPath, { ...flags, resolution: flags.resolution });
          return runFilmFitCommand('invert', profilePath, config, flags);
        }
        if (flags.report && !flags.out) throw new InputError('--report: needs --out DIR (the report is written into DIR/report)');
        const { config, sources } = buildInvertConfig(configPath, flags);
        // Checked now, not when the network estimator starts: a typo must not wait for (or hide behind) a classical fit.
        const workers = workersFlag(flags.workers);
        const out = claimOut(flags, 'invert');
        return withOutput(out, () => invertCommand(profilePath, configPath, flags, config, sources, workers, out));
      }),
    );
}

async function invertCommand(profilePath: string, configPath: string | undefined, flags: InvertFlags, config: InvertConfig, sources: Record<string, string>, workers: number, out: OutputDirectory | undefined): Promise<number | void> {
  let stopCode: number | void = undefined;
  const progress = new Progress('invert', flags.quiet);
  const { invertPhases, readProfile } = await import('../../inverse/invert-task.js');
  // A file that cannot be read or parsed is refused here, before a worker thread starts for it.
  readProfile(profilePath, config);
  const run = new RunProgress(progress, invertPhases(config));
  const onStep = (phase: InvertPhaseName, done: number, detail: string, keep?: boolean) => run.at(phase, done, detail, keep);
  const onEstimator = (t: string) => progress.done(t);
  const task: InvertTask = { profilePath, config, sources, configSource: configPath ?? 'flags', workers, files: flags.out !== undefined };
  // Every method runs on a worker thread, so a signal ends every phase at once: the classical
  // fit and its refits are synchronous χN searches (on this thread the handler would wait for
  // them), and the network estimator's truth check and start are solves of their own.
  const { result, files } = await invertOnWorker(task, flags.out, onStep, onEstimator);
  if (flags.out && files) {
    const written = out!.write(files);
    if (!flags.quiet) process.stderr.write(`invert: wrote ${written.join(', ')}\n`);
    if (flags.report) stopCode = await (await import('../report-after-run.js')).reportAfterRun('invert', flags.out, 'the results', flags.quiet);
  }
  process.stdout.write(flags.json ? inversionResultText(result, 2) : summaryText(result));
  return stopCode;
}

/** The `invert` run on a worker thread (inverse/invert-worker.ts): SIGINT/SIGTERM end it in any phase at once, nothing written, 130/143. */
async function invertOnWorker(task: InvertTask, outDir: string | undefined, onStep: (phase: InvertPhaseName, done: number, detail: string, keep?: boolean) => void, onEstimator: (t: string) => void): Promise<InvertRunResult> {
  const { runInWorkers, PoolStopped } = await import('../../threads/worker-pool.js');
  const { errorFromWorker } = await import('../worker-errors.js');
  const { installStopHandlers, stopAbortSignal, RunStopped } = await import('../../runtime/stop.js');
  const kept = outDir ? ` (${outDir} is left as it was)` : '';
  // The phase the run last reported, named in the stop message.
  let phase = 'classical fit';
  let estimators = 0;
  const uninstall = installStopHandlers('invert', `stopping the ${task.config.method === 'classical' ? 'fit' : 'inversion'}; nothing will be written${kept}`);
  try {
    const [r] = await runInWorkers<InvertTask, InvertRunResult, InvertStep>([task], {
      entry: 'inverse/invert-worker.js',
      workerData: null,
      workers: 1,
      onProgress: (s) => {
        if (s.kind === 'step') {
          phase = s.phase === 'network' ? 'network estimator' : s.phase === 'assumed inputs' ? "assumed inputs' refits" : s.phase;
          onStep(s.phase, s.done, s.detail, s.keep);
        } else {
          // The classical estimate ends the fit; the network estimator (its warm start first) follows.
          phase = ++estimators === 1 && task.config.method !== 'classical' ? 'network estimator' : 'last checks';
          onEstimator(s.text);
        }
      },
      toError: errorFromWorker,
      signal: stopAbortSignal(),
    });
    return r;
  } catch (e) {
    if (e instanceof PoolStopped) throw new RunStopped(`invert stopped by a signal during the ${phase}; nothing was written${outDir ? ` (${outDir} was left as it was)` : ''}`);
    throw e;
  } finally {
    uninstall();
  }
}

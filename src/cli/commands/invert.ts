/** `mesofield invert`: recover χN (and the fields) from a measured composition profile. */
import type { Command } from 'commander';
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { writeDirectoryAtomic } from '../../io/atomic-write.js';
import { InputError, asInputError, parseOrThrow } from '../../io/errors.js';
import { invertConfigSchema } from '../../io/schemas/invert-config.js';
import type { InvertConfig } from '../../io/schemas/invert-config.js';
import { solutionToFile } from '../../io/formats/solution.js';
import { provenance } from '../../io/versions.js';
import { estimateClassical } from '../../inverse/classical.js';
import type { PeriodMode } from '../../inverse/objective.js';
import { fitCsv, classicalBlock, inversionResult, inversionResultText, networkBlock, summaryText } from '../../inverse/inversion-result.js';
import type { EstimatorBlock } from '../../inverse/inversion-result.js';
import { lengthUnits, parseProfileCsv } from '../../inverse/profile-csv.js';
import type { NetworkEstimate } from '../../inverse/network-estimator.js';
import { compareWithTruth, readTruthSidecar } from '../../inverse/truth-comparison.js';
import { action, numberFlag, workersFlag } from '../run-command.js';
import { obj, readRawConfig } from '../raw-config.js';
import { Progress } from '../progress.js';

interface InvertFlags {
  f?: string;
  method?: string;
  period?: string;
  chiNRange?: string;
  json?: boolean;
  out?: string;
  rgNm?: string;
  segments?: string;
  segmentLengthNm?: string;
  resolution?: string;
  nx?: string;
  ns?: string;
  profilePoints?: string;
  seeds?: string;
  workers?: string;
  adamSteps?: string;
  lbfgsIterations?: string;
  backend?: string;
  report?: boolean;
  quiet?: boolean;
}

function chiNRangeFlag(value: string | undefined): [number, number] | undefined {
  if (value === undefined) return undefined;
  const parts = value.split(',').map((s) => s.trim());
  const nums = parts.map(Number);
  if (parts.length !== 2 || parts.some((p) => p === '') || nums.some((v) => !Number.isFinite(v))) {
    throw new InputError(`--chiN-range: got ${JSON.stringify(value)}; allowed: two numbers lo,hi (e.g. 11,40)`);
  }
  if (!(nums[0] > 0 && nums[0] < nums[1])) throw new InputError(`--chiN-range: got ${JSON.stringify(value)}; allowed: 0 < lo < hi`);
  return [nums[0], nums[1]];
}

/** Flags on top of the config file (or of an empty diblock config). */
export function buildInvertConfig(configPath: string | undefined, flags: InvertFlags): { config: InvertConfig; sources: Record<string, string> } {
  const raw: Record<string, unknown> = configPath ? readRawConfig(configPath) : { version: 2, kind: 'invert', system: { chain: { type: 'diblock' } } };
  const src = configPath ?? 'flags';
  const cell = obj(raw, 'cell');
  const fromFile = (block: Record<string, unknown>, key: string, path: string, flag: string) => (configPath && block[key] !== undefined ? `${configPath}: ${path}` : flag);
  const sources: Record<string, string> = {
    method: fromFile(raw, 'method', 'method', '--method'),
    period: fromFile(cell, 'period', 'cell.period', '--period'),
    chiNRange: fromFile(raw, 'chiNRange', 'chiNRange', '--chiN-range'),
  };
  const chain = obj(obj(raw, 'system'), 'chain');
  if (chain.type === undefined) chain.type = 'diblock';
  const f = numberFlag('--f', flags.f);
  if (f !== undefined) chain.f = f;
  if (!configPath && f === undefined) throw new InputError('--f: missing; the A fraction f of the chain is required (or a CONFIG file with system.chain)');
  const network = obj(raw, 'network');
  const seeds = numberFlag('--seeds', flags.seeds);
  if (seeds !== undefined) network.seeds = seeds;
  const nsteps = numberFlag('--adam-steps', flags.adamSteps);
  if (nsteps !== undefined) network.adamSteps = nsteps;
  const nlbfgs = numberFlag('--lbfgs-iterations', flags.lbfgsIterations);
  if (nlbfgs !== undefined) network.lbfgsIterations = nlbfgs;
  if (flags.backend !== undefined) network.backend = flags.backend;
  if (flags.method !== undefined) {
    raw.method = flags.method;
    sources.method = '--method';
  }
  if (flags.period !== undefined) {
    cell.period = flags.period === 'equilibrium' || flags.period === 'free' ? flags.period : numberFlag('--period', flags.period);
    sources.period = '--period';
  }
  const range = chiNRangeFlag(flags.chiNRange);
  if (range) {
    raw.chiNRange = range;
    sources.chiNRange = '--chiN-range';
  }
  const res = numberFlag('--resolution', flags.resolution);
  if (res !== undefined) raw.resolution = res;
  const nx = numberFlag('--nx', flags.nx);
  if (nx !== undefined) cell.nx = nx;
  const ns = numberFlag('--ns', flags.ns);
  if (ns !== undefined) cell.ns = ns;
  const pp = numberFlag('--profile-points', flags.profilePoints);
  if (pp !== undefined) raw.profilePoints = pp;
  const unitFlags = { rgNm: numberFlag('--rg-nm', flags.rgNm), segments: numberFlag('--segments', flags.segments), segmentLengthNm: numberFlag('--segment-length-nm', flags.segmentLengthNm) };
  if (Object.values(unitFlags).some((v) => v !== undefined)) {
    raw.units = Object.fromEntries(Object.entries(unitFlags).filter(([, v]) => v !== undefined));
  }
  return { config: parseOrThrow(invertConfigSchema, raw, src), sources };
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
    .option('--adam-steps <n>', 'network: Adam steps per seed (network.adamSteps)')
    .option('--lbfgs-iterations <n>', 'network: L-BFGS iterations per seed after the Adam steps (network.lbfgsIterations)')
    .option('--backend <b>', 'network: tfjs backend auto | native | wasm | cpu')
    .option('--period <mode>', 'equilibrium (stress-free at each χN, default) | free (fitted) | L (given, in the units of x)')
    .option('--chiN-range <lo,hi>', 'χN search range (default 1.01 × the spinodal χN to 60)')
    .option('--resolution <W>', 'Gaussian instrument resolution (standard deviation, units of x)')
    .option('--rg-nm <R>', 'x is in nm and Rg = R nm')
    .option('--segments <N>', 'x is in nm; with --segment-length-nm, Rg = b·sqrt(N/6)')
    .option('--segment-length-nm <b>', 'statistical segment length in nm (with --segments)')
    .option('--nx <n>', 'model grid points per period (power of two; default 64)')
    .option('--ns <n>', 'model contour steps (default 100)')
    .option('--profile-points <k>', 'extra points on the profile-likelihood curve (default 9)')
    .option('--json', 'print the result JSON on stdout')
    .option('--out <dir>', 'write result.json, fit.csv and solution.json into this directory')
    .option('--report', 'also write a PDF/PNG report into <out>/report (needs --out)')
    .option('--quiet', 'no progress on stderr')
    .action(
      action(async (profilePath: string, configPath: string | undefined, flags: InvertFlags) => {
        if (flags.report && !flags.out) throw new InputError('--report: needs --out DIR (the report is written into DIR/report)');
        const { config, sources } = buildInvertConfig(configPath, flags);
        const units = lengthUnits(config.units ?? {});
        let text: string;
        try {
          text = readFileSync(profilePath, 'utf8');
        } catch (e) {
          throw new InputError(`${profilePath}: cannot read the file (${(e as NodeJS.ErrnoException).code ?? String(e)})`);
        }
        const data = parseProfileCsv(text, profilePath, units);
        const toRg = (v: number) => (units.x === 'nm' ? v / units.rgNm! : v);
        const period: PeriodMode = typeof config.cell.period === 'number' ? { mode: 'given', value: toRg(config.cell.period) } : { mode: config.cell.period };
        const progress = new Progress('invert', flags.quiet);
        let estimate;
        try {
          estimate = estimateClassical(data, {
            chain: config.system.chain,
            nx: config.cell.nx,
            ns: config.cell.ns,
            solver: config.solver,
            period,
            chiNRange: config.chiNRange as [number, number] | undefined,
            resolution: toRg(config.resolution),
            profilePoints: config.profilePoints,
            periodSource: sources.period,
            rangeSource: sources.chiNRange,
            onEvaluation: (stage, e) => progress.update(`${stage}: χN = ${e.chiN.toPrecision(7)}, misfit ${e.value.toPrecision(6)}, period ${e.period.toPrecision(6)} Rg (${e.phase})`),
          });
        } catch (e) {
          throw asInputError(e, configPath ?? 'flags');
        }
        progress.done(`χN = ${estimate.chiN.toPrecision(6)} in ${estimate.seconds.toFixed(2)} s (${estimate.cost.chiNEvaluations} χN evaluations, ${estimate.cost.solves + estimate.cost.coarseSolves} solves)`);
        const estimators: Record<string, EstimatorBlock> = {};
        let ne: NetworkEstimate | undefined;
        if (config.method !== 'network') estimators.classical = classicalBlock(estimate, data);
        if (config.method !== 'classical') {
          // The network fits χN and the fields; the phase offset and period come from the classical fit.
          const { estimateNetwork } = await import('../../inverse/network-estimator.js');
          const net = config.network;
          ne = await estimateNetwork(data, estimate, {
            chain: config.system.chain,
            seeds: Array.from({ length: net.seeds }, (_, i) => i + 1),
            steps: net.adamSteps,
            fieldUpdateEvery: net.fieldUpdateEvery,
            lbfgsIterations: net.lbfgsIterations,
            lbfgsPerUpdate: net.lbfgsPerUpdate,
            chiNStart: net.chiNStart,
            resolution: toRg(config.resolution),
            backend: net.backend,
            workers: workersFlag(flags.workers),
            onProgress: (seed, step, steps, chiN) => progress.update(`network, seed ${seed}: step ${step}/${steps}, χN = ${chiN.toPrecision(6)}`),
          });
          progress.done(`network χN = ${ne.chiN.toPrecision(6)} ± ${ne.spread.toPrecision(2)} (seed spread of ${net.seeds}) in ${ne.seconds.toFixed(1)} s on ${ne.backend}`);
          estimators.network = networkBlock(ne, estimate, data);
        }
        // A synthetic profile (synth --out) has its truth beside it: measure the estimates against it.
        const truthPath = `${profilePath}.truth.json`;
        const truth = existsSync(truthPath) ? compareWithTruth(truthPath, readTruthSidecar(truthPath).chiN, config.system.chain, estimate, ne) : undefined;
        const result = inversionResult(data, config, provenance(), estimators, truth);
        if (flags.out) {
          const files = {
            'result.json': inversionResultText(result),
            'fit.csv': fitCsv(data, estimate),
            'solution.json': `${JSON.stringify(solutionToFile(estimate.solution, provenance(), config), null, 1)}\n`,
          };
          writeDirectoryAtomic(flags.out, files);
          if (!flags.quiet) process.stderr.write(`invert: wrote ${Object.keys(files).map((n) => join(flags.out!, n)).join(', ')}\n`);
          if (flags.report) {
            const { reportRunDirectory } = await import('../../reports/report-run-directory.js');
            const written = reportRunDirectory(flags.out, join(flags.out, 'report'));
            if (!flags.quiet) process.stderr.write(`invert: wrote ${written.join(', ')}\n`);
          }
        }
        process.stdout.write(flags.json ? inversionResultText(result, 2) : summaryText(result));
      }),
    );
}

/** `mesofield fit-scattering`: χN of a disordered melt from I(q) (Leibler's RPA), and χ(T) from a temperature series. */
import type { Command } from 'commander';
import { claimOut, withOutput } from '../run-output.js';
import { nothingWritten, withStopPoint } from '../short-run-stop.js';
import { dirname } from 'node:path';
import { InputError, parseOrThrow } from '../../io/errors.js';
import { action, numberFlag } from '../run-command.js';
import { obj, readRawConfig } from '../raw-config.js';

interface Flags {
  config?: string;
  chain?: string;
  f?: string;
  segmentRatio?: string;
  temperatures?: string;
  rgNm?: string;
  rgNmSd?: string;
  segments?: string;
  segmentLengthNm?: string;
  resolution?: string;
  chiNRange?: string;
  nbar?: string;
  json?: boolean;
  out?: string;
  overwrite?: boolean;
  report?: boolean;
  quiet?: boolean;
}

function numberList(flag: string, value: string): number[] {
  const parts = value.split(',').map((s) => s.trim());
  const nums = parts.map(Number);
  if (parts.some((p) => p === '') || nums.some((v) => !Number.isFinite(v))) throw new InputError(`${flag}: got ${JSON.stringify(value)}; allowed: comma-separated numbers`);
  return nums;
}

/** Flags on top of the config file (or of an empty diblock config). */
export function buildScatteringConfig(files: string[], flags: Flags): Record<string, unknown> {
  const raw: Record<string, unknown> = flags.config ? readRawConfig(flags.config) : { version: 2, kind: 'fit-scattering', system: { chain: { type: 'diblock' } } };
  const chain = obj(obj(raw, 'system'), 'chain');
  if (flags.chain !== undefined) chain.type = flags.chain;
  if (chain.type === undefined) chain.type = 'diblock';
  const f = numberFlag('--f', flags.f);
  if (f !== undefined) chain.f = f;
  if (!flags.config && f === undefined) throw new InputError('--f: missing; the A fraction f of the chain is required (or --config FILE with system.chain)');
  const ratio = numberFlag('--segment-ratio', flags.segmentRatio);
  if (ratio !== undefined) chain.segmentRatio = ratio;
  const units = obj(raw, 'units');
  for (const [flag, key, v] of [
    ['--rg-nm', 'rgNm', flags.rgNm],
    ['--rg-nm-sd', 'rgNmSd', flags.rgNmSd],
    ['--segments', 'segments', flags.segments],
    ['--segment-length-nm', 'segmentLengthNm', flags.segmentLengthNm],
  ] as const) {
    const n = numberFlag(flag, v);
    if (n !== undefined) units[key] = n;
  }
  const res = numberFlag('--resolution', flags.resolution);
  if (res !== undefined) raw.resolution = res;
  const nbar = numberFlag('--nbar', flags.nbar);
  if (nbar !== undefined) raw.nbar = nbar;
  if (flags.chiNRange !== undefined) {
    const r = numberList('--chiN-range', flags.chiNRange);
    if (r.length !== 2 || !(r[0] < r[1])) throw new InputError(`--chiN-range: got ${JSON.stringify(flags.chiNRange)}; allowed: two numbers lo,hi with lo < hi`);
    raw.chiNRange = r;
  }
  const temps = flags.temperatures !== undefined ? numberList('--temperatures', flags.temperatures) : undefined;
  if (files.length > 0) {
    if (temps && temps.length !== files.length) throw new InputError(`--temperatures: got ${temps.length} temperature(s) for ${files.length} file(s); give one temperature (K) per file, in the same order`);
    raw.files = files.map((file, i) => (temps ? { file, temperature: temps[i] } : { file }));
  } else if (temps) throw new InputError('--temperatures: needs the files on the command line (a config lists its temperatures beside its files)');
  if (raw.files === undefined) throw new InputError('files: none given; name the CSV files on the command line or list them in the config (files: [{ file, temperature }])');
  return raw;
}

export function registerFitScattering(program: Command): void {
  program
    .command('fit-scattering')
    .description("χN of a disordered melt from small-angle scattering I(q) by Leibler's RPA, with profile-likelihood intervals; with temperatures, χ(T) = A/T + B and the transition temperature")
    .argument('[files...]', 'CSV files with a header: q_per_nm or q_per_A, I, and optionally dI')
    .option('--config <file>', 'fit-scattering config JSON (kind "fit-scattering"); flags override it')
    .option('--chain <type>', 'diblock | triblock (default diblock)')
    .option('--f <f>', 'A fraction of the chain (required without a config)')
    .option('--segment-ratio <r>', 'b_A/b_B, the segment-length ratio (conformational asymmetry)')
    .option('--temperatures <T1,T2,...>', 'temperature of each file in K, in the order of the files')
    .option('--rg-nm <R>', 'fix Rg = R nm (default: Rg fitted from the peak position)')
    .option('--rg-nm-sd <S>', 'with --rg-nm: Rg is uncertain with this standard deviation (nm); profiled out under a Gaussian constraint')
    .option('--segments <N>', 'N, the number of reference segments: reports χ = χN/N; with --segment-length-nm, Rg = b·sqrt(N/6)')
    .option('--segment-length-nm <b>', 'statistical segment length in nm (with --segments)')
    .option('--resolution <S>', 'Gaussian q resolution (standard deviation) in the units of the q column')
    .option('--chiN-range <lo,hi>', 'χN search range (default −(χN)_s to the spinodal (χN)_s)')
    .option('--nbar <Nbar>', 'invariant degree of polymerisation N̄: adds the Fredrickson–Helfand fluctuation-corrected ODT (symmetric diblocks)')
    .option('--json', 'print the result JSON on stdout')
    .option('--out <dir>', 'write result.json and one fit-<k>.csv per file into this directory')
    .option('--overwrite', 'replace a previous fit-scattering output in --out (only the files mesofield wrote there)')
    .option('--report', 'also write a PDF/PNG report into <out>/report (needs --out)')
    .option('--quiet', 'no progress on stderr')
    .action(
      action(async (files: string[], flags: Flags) => {
        const { scatteringConfigSchema } = await import('../../io/schemas/scattering-config.js');
        const { runScatteringFit } = await import('../../inverse/scattering/run-scattering-fit.js');
        const { scatteringSummary } = await import('../../inverse/scattering/scattering-result.js');
        const { scatteringFitFiles, scatteringResultSchema } = await import('../../io/formats/scattering-fit.js');
        const { formatText } = await import('../../io/formats/file-format.js');
        const { provenance } = await import('../../io/versions.js');
        const { asInputError } = await import('../../io/errors.js');
        const { writeFitOutput } = await import('./fit-command.js');
        if (flags.report && !flags.out) throw new InputError('--report: needs --out DIR (the report is written into DIR/report)');
        const raw = buildScatteringConfig(files, flags);
        const config = parseOrThrow(scatteringConfigSchema, raw, flags.config ?? 'flags');
        const baseDir = flags.config && files.length === 0 ? dirname(flags.config) : process.cwd();
        // --out is claimed before the fits run (io/output-directory.ts: new, empty or a previous fit-scattering output).
        const claimed = claimOut(flags, 'fit-scattering');
        const { Progress } = await import('../progress.js');
        return withStopPoint('fit-scattering', nothingWritten('fit-scattering', flags.out), (stop) =>
          withOutput(claimed, async () => {
            const progress = new Progress('fit-scattering', flags.quiet, 0);
            let run;
            try {
              run = runScatteringFit(config, {
                baseDir,
                rgSource: flags.config ? `${flags.config}: units` : 'flags',
                provenance: provenance(),
                // Every file is a fit of about the same cost: the time left is the files left at the rate so far.
                onFit: (i, total, fit) => progress.step(i + 1, total, `${fit.source}: χN = ${fit.chiN.toPrecision(5)}, reduced χ² ${fit.reducedChi2.toPrecision(3)}, ${fit.seconds.toFixed(2)} s`, 'files'),
              });
            } catch (e) {
              throw asInputError(e, flags.config ?? 'flags');
            }
            const { result } = run;
            await stop.beforeWriting();
            await writeFitOutput('fit-scattering', claimed, flags, scatteringFitFiles(result), async () => (await import('../../reports/scattering-fit-report.js')).scatteringFitReport(flags.out!, result));
            process.stdout.write(flags.json ? formatText(scatteringResultSchema, result, 2) : scatteringSummary(result));
          }),
        );
      }),
    );
}

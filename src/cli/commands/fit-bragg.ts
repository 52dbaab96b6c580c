/** `mesofield fit-bragg`: χN and the lamellar period from measured Bragg peaks (flags over a "fit-bragg" config). */
import type { Command } from 'commander';
import type { ConfigInput } from '../config-input.js';
import type { FitCommandFlags } from './fit-command.js';
import type { BraggFitFile } from '../../io/formats/measurement-fits.js';
import { fitConfigInput, measurementFitOnWorker, writeFitOutput } from './fit-command.js';
import { action } from '../run-command.js';
import { numberList } from './film-flags.js';

const EXPECTED_EVALUATIONS = 40;

interface FitBraggFlags extends FitCommandFlags {
  lorentz?: boolean;
  chiNRange?: string;
  rgNm?: string;
  rgNmSd?: string;
}

/** Flags on top of the config file (or of an empty diblock config); messages name the flag or the file's key. */
export function buildBraggFitInput(configPath: string | undefined, flags: FitBraggFlags): ConfigInput<'fit-bragg'> {
  const input = fitConfigInput('fit-bragg', configPath, flags);
  input.number('--rg-nm', flags.rgNm);
  input.number('--rg-nm-sd', flags.rgNmSd);
  if (flags.lorentz) input.set('--lorentz', true);
  const range = numberList('--chiN-range', flags.chiNRange, 2, '12,40');
  if (range) input.set('--chiN-range', range);
  return input;
}

export function registerFitBragg(program: Command): void {
  program
    .command('fit-bragg')
    .description('χN and the lamellar period D from measured Bragg peaks (positions and integrated intensities), with profile-likelihood intervals')
    .argument('<peaks>', 'CSV: order, q_per_nm or q_per_A, I, dI, and optionally dq')
    .argument('[config]', 'fit-bragg config JSON (kind "fit-bragg"); flags override it')
    .option('--f <f>', 'A fraction of the diblock (required without a config)')
    .option('--segment-ratio <r>', 'b_A/b_B')
    .option('--lorentz', 'the measured intensities carry the powder Lorentz factor 1/q²')
    .option('--chiN-range <lo,hi>', 'χN search range (default 1.01 × the spinodal to 60)')
    .option('--rg-nm <R>', 'tie D to Rg·L_eq(χN) with Rg = R nm: the positions then constrain χN too (default: D free, χN from the intensities alone)')
    .option('--rg-nm-sd <S>', "with --rg-nm: Rg's standard deviation in nm, profiled out under a Gaussian constraint")
    .option('--nx <n>', 'model grid points per period (power of two; default 64)')
    .option('--ns <n>', 'model contour steps (default 100)')
    .option('--json', 'print the result JSON on stdout')
    .option('--out <dir>', 'write result.json into this directory')
    .option('--overwrite', 'replace a previous fit-bragg output in --out (only the files mesofield wrote there)')
    .option('--report', 'also write a PDF/PNG report into <out>/report (needs --out)')
    .option('--quiet', 'no progress on stderr')
    .action(
      action(async (peaksPath: string, configPath: string | undefined, flags: FitBraggFlags) => {
        const { braggFitConfigSchema } = await import('../../io/schemas/bragg-fit-config.js');
        const { braggFitText } = await import('../../inverse/measurement-fit-text.js');
        const { formatText } = await import('../../io/formats/file-format.js');
        const { braggFitFileSchema } = await import('../../io/formats/measurement-fits.js');
        const { provenance } = await import('../../io/versions.js');
        const { claimOut, withOutput } = await import('../run-output.js');
        const { Progress } = await import('../progress.js');
        const input = buildBraggFitInput(configPath, flags);
        const config = input.parse(braggFitConfigSchema);
        const where = (key: string, flag: string, given: unknown) => (configPath && given === undefined ? `${configPath}: ${key}` : flag);
        const out = claimOut(flags, 'fit-bragg');
        return withOutput(out, async () => {
          const progress = new Progress('fit-bragg', flags.quiet);
          // The fit runs on a worker thread, so a signal ends it at once.
          const result = await measurementFitOnWorker<BraggFitFile>(
            'fit-bragg',
            {
              kind: 'bragg',
              path: peaksPath,
              config,
              options: { provenance: provenance(), rgSource: where('units.rgNm', '--rg-nm', flags.rgNm), rangeSource: where('chiNRange', '--chiN-range', flags.chiNRange) },
              source: configPath ?? 'flags',
            },
            flags.out,
            // The scan, the refinement and four interval ends take about 40 evaluations (measured on the test's peaks).
            ([k, chiN, chi2]) => progress.step(k, EXPECTED_EVALUATIONS, `χN = ${chiN.toPrecision(6)}, χ² ${chi2.toPrecision(5)}`, 'evaluations', true),
          );
          progress.done(`χN = ${result.chiN.toPrecision(5)} in ${result.seconds.toFixed(2)} s (${result.evaluations} model evaluations)`);
          const fit = result;
          await writeFitOutput('fit-bragg', out, flags, { 'result.json': formatText(braggFitFileSchema, fit) }, async () => (await import('../../reports/measurement-fit-input.js')).measurementFitReport(flags.out!, { bragg: fit }));
          process.stdout.write(flags.json ? formatText(braggFitFileSchema, result, 2) : braggFitText(result));
        });
      }),
    );
}

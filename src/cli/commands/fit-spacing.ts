/** `mesofield fit-spacing`: χ and the segment length b from lamellar periods measured for several chain lengths (flags over a "fit-spacing" config). */
import type { Command } from 'commander';
import type { ConfigInput } from '../config-input.js';
import type { FitCommandFlags } from './fit-command.js';
import type { SpacingFitFile } from '../../io/formats/measurement-fits.js';
import { fitConfigInput, measurementFitOnWorker, writeFitOutput } from './fit-command.js';
import { action } from '../run-command.js';
import { numberList } from './film-flags.js';

interface FitSpacingFlags extends FitCommandFlags {
  chiRange?: string;
}

/** Flags on top of the config file (or of an empty diblock config); messages name the flag or the file's key. */
export function buildSpacingFitInput(configPath: string | undefined, flags: FitSpacingFlags): ConfigInput<'fit-spacing'> {
  const input = fitConfigInput('fit-spacing', configPath, flags);
  const range = numberList('--chi-range', flags.chiRange, 2, '0.05,0.2');
  if (range) input.set('--chi-range', range);
  return input;
}

// The scan, the refinement and four interval ends take about 40 χ values, each one solve per N.
const EXPECTED_EVALUATIONS = 40;

export function registerFitSpacing(program: Command): void {
  program
    .command('fit-spacing')
    .description("χ and the statistical segment length b from the lamellar period D measured for several N (same chemistry and temperature), through the reference's D(χN)")
    .argument('<file>', 'CSV: N, D_nm, and optionally dD_nm')
    .argument('[config]', 'fit-spacing config JSON (kind "fit-spacing"); flags override it')
    .option('--f <f>', 'A fraction of the diblock, the same for every N (required without a config)')
    .option('--segment-ratio <r>', 'b_A/b_B')
    .option('--chi-range <lo,hi>', 'χ search range (default: from 1.05 × the spinodal at the smallest N to χN = 60 at the largest)')
    .option('--nx <n>', 'model grid points per period (power of two; default 64)')
    .option('--ns <n>', 'model contour steps (default 100)')
    .option('--json', 'print the result JSON on stdout')
    .option('--out <dir>', 'write result.json into this directory')
    .option('--overwrite', 'replace a previous fit-spacing output in --out (only the files mesofield wrote there)')
    .option('--report', 'also write a PDF/PNG report into <out>/report (needs --out)')
    .option('--quiet', 'no progress on stderr')
    .action(
      action(async (path: string, configPath: string | undefined, flags: FitSpacingFlags) => {
        const { spacingFitConfigSchema } = await import('../../io/schemas/spacing-fit-config.js');
        const { spacingFitText } = await import('../../inverse/measurement-fit-text.js');
        const { formatText } = await import('../../io/formats/file-format.js');
        const { spacingFitFileSchema } = await import('../../io/formats/measurement-fits.js');
        const { provenance } = await import('../../io/versions.js');
        const { claimOut, withOutput } = await import('../run-output.js');
        const { Progress } = await import('../progress.js');
        const config = buildSpacingFitInput(configPath, flags).parse(spacingFitConfigSchema);
        const out = claimOut(flags, 'fit-spacing');
        return withOutput(out, async () => {
          const progress = new Progress('fit-spacing', flags.quiet);
          // The fit runs on a worker thread, so a signal ends it at once.
          const result = await measurementFitOnWorker<SpacingFitFile>('fit-spacing', { kind: 'spacing', path, config, options: { provenance: provenance() }, source: configPath ?? 'flags' }, flags.out, ([k, chi, chi2]) =>
            progress.step(k, EXPECTED_EVALUATIONS, `χ = ${chi.toPrecision(6)}, χ² ${chi2.toPrecision(5)}`, 'χ values', true),
          );
          progress.done(`χ = ${result.chi.toPrecision(5)} in ${result.seconds.toFixed(2)} s (${result.evaluations} χ values)`);
          const fit = result;
          await writeFitOutput('fit-spacing', out, flags, { 'result.json': formatText(spacingFitFileSchema, fit) }, async () => (await import('../../reports/measurement-fit-input.js')).measurementFitReport(flags.out!, { spacing: fit }));
          process.stdout.write(flags.json ? formatText(spacingFitFileSchema, result, 2) : spacingFitText(result));
        });
      }),
    );
}

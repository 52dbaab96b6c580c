/** `mesofield bragg-pattern`: the Bragg peaks of a solved or fitted lamella (a solution file). */
import type { Command } from 'commander';
import { claimOut, withOutput } from '../run-output.js';
import { nothingWritten, withStopPoint } from '../short-run-stop.js';
import { InputError } from '../../io/errors.js';
import { action, numberFlag } from '../run-command.js';
import { writeFitOutput } from './fit-command.js';

interface PatternFlags {
  overwrite?: boolean;
  orders: string;
  report?: boolean;
  lorentz?: boolean;
  width?: string;
  rgNm?: string;
  json?: boolean;
  out?: string;
  quiet?: boolean;
}

export function registerBragg(program: Command): void {
  program
    .command('bragg-pattern')
    .description('Bragg peak positions q_n = 2πn/D and relative intensities of a lamella (a solution file from solve or invert)')
    .argument('<solution>', 'solution.json of a periodic lamella')
    .option('--orders <n>', 'number of orders', '6')
    .option('--lorentz', 'apply the powder Lorentz factor 1/q²')
    .option('--width <w>', 'peak standard deviation for the drawn pattern (1/Rg, or nm⁻¹ with --rg-nm); default 4 % of q_1 = 2π/D')
    .option('--rg-nm <R>', 'Rg in nm: q in nm⁻¹')
    .option('--json', 'print JSON on stdout')
    .option('--out <dir>', 'write result.json, peaks.csv and pattern.csv into this directory')
    .option('--overwrite', 'replace a previous bragg-pattern output in --out (only the files mesofield wrote there)')
    .option('--report', 'also draw the pattern into <out>/report (PDF/PNG; needs --out)')
    .option('--quiet', 'nothing on stderr but errors')
    .action(
      action(async (solution: string, flags: PatternFlags) => {
        const { runBraggPattern } = await import('../../inverse/bragg/run-bragg-pattern.js');
        const { braggPatternFiles, braggPatternFileSchema } = await import('../../io/formats/bragg-pattern.js');
        const { formatText } = await import('../../io/formats/file-format.js');
        const { braggPatternText } = await import('../../inverse/measurement-fit-text.js');
        const { provenance } = await import('../../io/versions.js');
        if (flags.report && !flags.out) throw new InputError('--report: needs --out DIR (the report is written into DIR/report)');
        const settings = { solution, orders: numberFlag('--orders', flags.orders)!, lorentz: Boolean(flags.lorentz), width: numberFlag('--width', flags.width), rgNm: numberFlag('--rg-nm', flags.rgNm) };
        const { result, curve } = runBraggPattern(settings, provenance());
        // --out claimed (io/output-directory.ts); the pattern is cheap, so it is claimed when the result is ready.
        const claimed = claimOut(flags, 'bragg-pattern');
        return withStopPoint('bragg-pattern', nothingWritten('bragg-pattern', flags.out), (stop) =>
          withOutput(claimed, async () => {
            await stop.beforeWriting();
            await writeFitOutput('bragg-pattern', claimed, flags, braggPatternFiles(result, curve), async () => (await import('../../reports/bragg-pattern-report.js')).braggPatternReport(flags.out!, result, curve));
            process.stdout.write(flags.json ? formatText(braggPatternFileSchema, result, 2) : braggPatternText(result));
          }),
        );
      }),
    );
}

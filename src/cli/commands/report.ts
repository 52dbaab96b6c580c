/** `mesofield report RUN_DIR`: figures and tables of a run as an A4 PDF and/or one PNG per figure. */
import type { Command } from 'commander';
import { join } from 'node:path';
import { InputError } from '../../io/errors.js';
import { writeRunReport } from '../../reports/report-run-directory.js';
import type { ReportFormat } from '../../reports/write-report.js';
import { action, numberFlag } from '../run-command.js';
import { nothingWritten, withStopPoint } from '../short-run-stop.js';

interface ReportFlags {
  out?: string;
  format: string;
  dpi: string;
  rgNm?: string;
  overwrite?: boolean;
  quiet?: boolean;
}

const FORMATS: readonly ReportFormat[] = ['pdf', 'png'];
const DPI_RANGE = [36, 1200] as const;

export function parseFormats(value: string): ReportFormat[] {
  const items = value.split(',').map((s) => s.trim().toLowerCase()).filter(Boolean);
  const bad = items.filter((s) => !FORMATS.includes(s as ReportFormat));
  if (items.length === 0 || bad.length) throw new InputError(`--format: got ${JSON.stringify(value)}; allowed: a comma-separated list of ${FORMATS.join(', ')}`);
  return [...new Set(items)] as ReportFormat[];
}

export function registerReport(program: Command): void {
  program
    .command('report')
    .description('write a report of a run directory: A4 PDF with figures, tables and assumptions, and/or one PNG per figure')
    .argument('<run-dir>', 'the --out directory of a solve (or train/evaluate/invert) run')
    .option('--out <dir>', 'where to write report.pdf and figures/*.png (default: RUN_DIR/report)')
    .option('--format <list>', 'pdf, png or pdf,png', 'pdf,png')
    .option('--dpi <n>', `PNG resolution in dots per inch (${DPI_RANGE[0]}–${DPI_RANGE[1]})`, '150')
    .option('--rg-nm <nm>', 'Rg in nanometres: also print the period in nm')
    .option('--overwrite', 'replace a previous report in the output folder (only the files mesofield wrote there)')
    .option('--quiet', 'no progress on stderr')
    .action(
      action(async (runDir: string, flags: ReportFlags) => {
        const formats = parseFormats(flags.format);
        const dpi = numberFlag('--dpi', flags.dpi)!;
        if (!Number.isInteger(dpi) || dpi < DPI_RANGE[0] || dpi > DPI_RANGE[1]) throw new InputError(`--dpi: got ${flags.dpi}; allowed: a whole number from ${DPI_RANGE[0]} to ${DPI_RANGE[1]}`);
        const rgNm = numberFlag('--rg-nm', flags.rgNm);
        if (rgNm !== undefined && !(rgNm > 0)) throw new InputError(`--rg-nm: got ${flags.rgNm}; allowed: Rg in nm, a number > 0`);
        const outDir = flags.out ?? join(runDir, 'report');
        // The drawing runs on this thread in one stretch: a signal stops the run before it writes (short-run-stop.ts).
        return withStopPoint('report', nothingWritten('report', outDir), async (stop) => {
          if (!flags.quiet) process.stderr.write(`report: drawing the report of ${runDir} (${formats.join(', ')}); Ctrl-C stops it before anything is written\n`);
          const r = await writeRunReport(runDir, outDir, { formats, dpi, rgNm, overwrite: flags.overwrite, insideRun: flags.out === undefined, flag: flags.out === undefined ? 'the report folder' : '--out', beforeWriting: stop.beforeWriting });
          if (!flags.quiet) {
            for (const n of r.notes) process.stderr.write(`report: note: ${n}\n`);
            process.stderr.write(`report: read ${r.read.join(', ')}\nreport: wrote ${r.written.join(', ')}\n`);
          }
        });
      }),
    );
}

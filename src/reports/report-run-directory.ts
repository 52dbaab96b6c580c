/**
 * Run directory → report files in one call. `writeRunReport` is the `report` command's work:
 * it claims the report folder like every command's --out (io/output-directory.ts: a new or
 * empty folder, or a previous report with --overwrite; marker, lock, only its own files
 * replaced), renders, then writes. `reportRunDirectory` writes a report inside a run's own
 * output, which that run has already claimed (`demo`; the `--report` of train, invert and
 * reflectivity through cli/report-after-run.ts, with a stop point).
 */
import { claimOutputDirectory } from '../io/output-directory.js';
import { buildReport } from './build-report.js';
import { loadRun } from './load-run.js';
import { renderReport, writeReportFiles } from './write-report.js';
import type { ReportFormat } from './write-report.js';

/** A run's report, drawn (nothing written yet). */
function renderRunDirectory(runDir: string, formats: readonly ReportFormat[], dpi: number) {
  return renderReport(buildReport(loadRun(runDir).input), formats, dpi);
}

export function reportRunDirectory(runDir: string, outDir: string, formats: readonly ReportFormat[] = ['pdf', 'png'], dpi = 150): string[] {
  return writeReportFiles(outDir, renderRunDirectory(runDir, formats, dpi));
}

/**
 * reportRunDirectory with a stop point between the drawing and the first write, for a command
 * that answers signals there (cli/report-after-run.ts): a stop at that point writes nothing.
 */
export async function reportRunDirectoryWithStop(runDir: string, outDir: string, beforeWriting: () => Promise<void>, formats: readonly ReportFormat[] = ['pdf', 'png'], dpi = 150): Promise<string[]> {
  const rendered = renderRunDirectory(runDir, formats, dpi);
  await beforeWriting();
  return writeReportFiles(outDir, rendered);
}

export interface RunReportOptions {
  formats: readonly ReportFormat[];
  dpi: number;
  rgNm?: number;
  /** Replace a previous report in outDir (only the files mesofield wrote there). */
  overwrite?: boolean;
  /** outDir is the default RUN_DIR/report (a report written by the run itself may be replaced). */
  insideRun?: boolean;
  /** How the user named outDir in messages (default "--out"). */
  flag?: string;
  /** Called after the rendering, before the first file is written (a stop there leaves nothing written). */
  beforeWriting?: () => Promise<void>;
}

export interface RunReport {
  written: string[];
  read: string[];
  notes: string[];
}

/** The `report` command: read the run, claim `outDir`, render and write; nothing is written on a failure. */
export async function writeRunReport(runDir: string, outDir: string, opts: RunReportOptions): Promise<RunReport> {
  const run = loadRun(runDir, { rgNm: opts.rgNm });
  const out = claimOutputDirectory(outDir, 'report', { overwrite: opts.overwrite, flag: opts.flag, nestedInRun: opts.insideRun });
  try {
    const rendered = renderReport(buildReport(run.input), opts.formats, opts.dpi);
    await opts.beforeWriting?.();
    const written = out.write(rendered.files);
    out.finish();
    return { written, read: run.read, notes: run.notes };
  } catch (e) {
    out.abandon();
    throw e;
  }
}

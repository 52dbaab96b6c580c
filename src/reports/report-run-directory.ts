/** Run directory → report files in one call (used by `demo` and by `train`/`invert --report`). */
import { buildReport } from './build-report.js';
import { loadRun } from './load-run.js';
import { renderReport, writeReportFiles } from './write-report.js';
import type { ReportFormat } from './write-report.js';

export function reportRunDirectory(runDir: string, outDir: string, formats: readonly ReportFormat[] = ['pdf', 'png'], dpi = 150): string[] {
  const run = loadRun(runDir);
  return writeReportFiles(outDir, renderReport(buildReport(run.input), formats, dpi));
}

/**
 * A report section turns its part of the ReportInput into pages, or into none when the
 * run has no such data. To add a section: give its input a field in report-inputs.ts,
 * write a ReportSection in this folder, and add it to REPORT_SECTIONS (sections/index.ts)
 * where it should appear in the report.
 */
import type { ReportPage } from '../document.js';
import type { ReportInput } from '../report-inputs.js';

export interface ReportSection {
  id: string;
  pages(input: ReportInput): ReportPage[];
}

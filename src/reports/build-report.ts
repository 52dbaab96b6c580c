/** ReportInput → ReportDocument: every section in order, each adding its pages or none. */
import type { ReportDocument } from './document.js';
import type { ReportInput } from './report-inputs.js';
import { REPORT_SECTIONS } from './sections/index.js';
import type { ReportSection } from './sections/index.js';
import { InputError } from '../io/errors.js';

export function buildReport(input: ReportInput, sections: readonly ReportSection[] = REPORT_SECTIONS): ReportDocument {
  const date = new Date(input.info.provenance.createdAt);
  if (Number.isNaN(date.getTime())) throw new InputError(`provenance.createdAt: got ${JSON.stringify(input.info.provenance.createdAt)}; allowed: an ISO 8601 date (the run's date is printed in the report)`);
  const pages = sections.flatMap((s) => s.pages(input));
  const ids = new Set<string>();
  for (const b of pages.flatMap((p) => p.blocks)) {
    if (b.type !== 'figure') continue;
    if (ids.has(b.id)) throw new Error(`report: two figures share the id "${b.id}"`);
    ids.add(b.id);
  }
  return { title: `mesofield ${input.info.kind} report: ${input.info.source}`, date, pages };
}

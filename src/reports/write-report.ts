/**
 * Render every requested format first, then write: a rendering failure leaves the output
 * directory as it was, and each file is replaced atomically (io/atomic-write.ts). Files
 * are written one by one rather than as a swapped directory, so --out may safely be the
 * run directory itself.
 */
import { join } from 'node:path';
import { writeFileAtomic } from '../io/atomic-write.js';
import type { ReportDocument } from './document.js';
import { renderPdf } from './render-pdf.js';
import { renderPngs } from './render-png.js';

export type ReportFormat = 'pdf' | 'png';

export interface ReportFiles {
  /** Relative path → bytes. */
  files: Record<string, Buffer>;
}

export function renderReport(doc: ReportDocument, formats: readonly ReportFormat[], dpi: number): ReportFiles {
  const files: Record<string, Buffer> = {};
  if (formats.includes('pdf')) files['report.pdf'] = renderPdf(doc);
  if (formats.includes('png')) for (const [name, data] of Object.entries(renderPngs(doc, dpi))) files[join('figures', name)] = data;
  return { files };
}

export function writeReportFiles(outDir: string, r: ReportFiles): string[] {
  const written: string[] = [];
  for (const [name, data] of Object.entries(r.files)) {
    const path = join(outDir, name);
    writeFileAtomic(path, data);
    written.push(path);
  }
  return written;
}

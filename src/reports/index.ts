/** The reports library: run directory or typed inputs → document → PDF / PNG. */
export type * from './report-inputs.js';
export type { Block, FigureBlock, ReportDocument, ReportPage, TableBlock, TextBlock } from './document.js';
export { figuresOf } from './document.js';
export { buildReport } from './build-report.js';
export { REPORT_SECTIONS } from './sections/index.js';
export type { ReportSection } from './sections/index.js';
export { loadRun } from './load-run.js';
export { renderPdf, pdfPageCount } from './render-pdf.js';
export { renderFigurePng, renderPngs, pngSize } from './render-png.js';
export { renderReport, writeReportFiles } from './write-report.js';
export type { ReportFormat } from './write-report.js';

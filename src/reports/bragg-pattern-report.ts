/**
 * The report of a bragg-pattern run, from its result file's value and the drawn curve of its
 * pattern.csv (both io/formats/bragg-pattern.ts): the title block and the pattern page.
 */
import type { BraggPatternCurve, BraggPatternFile } from '../io/formats/bragg-pattern.js';
import { buildReport } from './build-report.js';
import type { ReportDocument } from './document.js';
import type { ReportInput } from './report-inputs.js';
import { sig } from './format.js';

export function braggPatternInput(source: string, r: BraggPatternFile, curve: BraggPatternCurve): ReportInput {
  const periodText = r.periodNm !== undefined ? `${r.periodNm.toPrecision(5)} nm (${r.period.toPrecision(5)} Rg)` : `${r.period.toPrecision(5)} Rg`;
  const settings = [
    { name: 'solution', value: r.solution },
    { name: 'orders', value: String(r.orders) },
    { name: 'Lorentz factor', value: r.lorentz ? 'yes' : 'no' },
    { name: 'peak width', value: `${sig(r.width, 4)} ${r.qUnit}` },
  ];
  const info = { kind: 'bragg-pattern', source, system: r.system, period: r.period, ...(r.rgNm !== undefined ? { rgNm: r.rgNm } : {}), settings, provenance: r.provenance };
  const peaks = r.peaks.map((k) => ({ order: k.order, q: k.q, relative: k.relative ?? Number.NaN }));
  return { info, bragg: { qLabel: r.rgNm !== undefined ? 'q / nm⁻¹' : 'q Rg', chiN: r.chiN, periodText, lorentz: r.lorentz, width: r.width, peaks, curve } };
}

export function braggPatternReport(source: string, r: BraggPatternFile, curve: BraggPatternCurve): ReportDocument {
  return buildReport(braggPatternInput(source, r, curve));
}

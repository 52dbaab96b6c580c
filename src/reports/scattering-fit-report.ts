/**
 * The report of a fit-scattering result (its result.json, io/formats/scattering-fit.ts): the
 * title block from the config the file carries, and the scattering pages. `fit-scattering
 * --report` and `report DIR` both build it here, from the file's value.
 */
import type { ScatteringResultFile } from '../io/formats/scattering-fit.js';
import { buildReport } from './build-report.js';
import type { ReportDocument } from './document.js';
import type { ReportInput } from './report-inputs.js';
import { scatteringReportInput } from './scattering-input.js';

export function scatteringFitInput(source: string, result: ScatteringResultFile): ReportInput {
  const config = result.config;
  const settings = [
    { name: 'files', value: config.files.map((f) => f.file + (f.temperature !== undefined ? ` (${f.temperature} K)` : '')).join(', ') },
    { name: 'resolution', value: String(config.resolution) },
    { name: 'units', value: JSON.stringify(config.units) },
  ];
  const info = {
    kind: 'fit-scattering',
    source,
    system: { chain: config.system.chain, chiN: result.fits[0].chiN },
    period: Number.NaN,
    settings,
    provenance: result.provenance,
    runSeconds: result.seconds,
    runSecondsNote: 'all fits',
  };
  return { info, scattering: scatteringReportInput(result) };
}

export function scatteringFitReport(source: string, result: ScatteringResultFile): ReportDocument {
  return buildReport(scatteringFitInput(source, result));
}

/** The report input of a fit-bragg or fit-spacing result (their result files, io/formats/measurement-fits.ts), and its ReportDocument. */
import type { BraggFitFile, SpacingFitFile } from '../io/formats/measurement-fits.js';
import type { ChainSpec } from '../physics/chain-schema.js';
import { buildReport } from './build-report.js';
import type { ReportDocument } from './document.js';
import type { ReportInput, SettingRow } from './report-inputs.js';
import { formatValue } from '../io/number-format.js';

/** Every leaf of the config as one row ("cell.nx: 64"). */
function settingRows(config: unknown, prefix = ''): SettingRow[] {
  if (config === null || typeof config !== 'object' || Array.isArray(config)) return [{ name: prefix, value: formatValue(config) }];
  return Object.entries(config as Record<string, unknown>).flatMap(([k, v]) => settingRows(v, prefix ? `${prefix}.${k}` : k));
}

export type MeasurementFit = { bragg: BraggFitFile } | { spacing: SpacingFitFile };

export function measurementFitInput(source: string, fit: MeasurementFit): ReportInput {
  const r = 'bragg' in fit ? fit.bragg : fit.spacing;
  const config = r.config as { system: { chain: ChainSpec } };
  const bragg = 'bragg' in fit ? fit.bragg : undefined;
  const info = {
    kind: r.kind === 'bragg-fit' ? 'fit-bragg' : 'fit-spacing',
    source,
    system: { chain: config.system.chain, chiN: bragg ? bragg.chiN : Number.NaN },
    period: bragg ? bragg.period : Number.NaN,
    // Only a given Rg goes on the title page; an implied one is a result (in the results table).
    ...(bragg?.rgTie ? { rgNm: bragg.rgTie.rgNm } : {}),
    settings: [{ name: 'data file', value: r.file }, ...settingRows(r.config).filter((s) => s.name !== 'version' && s.name !== 'kind')],
    provenance: r.provenance,
    runSeconds: r.seconds,
    runSecondsNote: 'the fit, model solves included',
  };
  return { info, ...('bragg' in fit ? { braggFit: fit.bragg } : { spacingFit: fit.spacing }) };
}

export function measurementFitReport(source: string, fit: MeasurementFit): ReportDocument {
  return buildReport(measurementFitInput(source, fit));
}

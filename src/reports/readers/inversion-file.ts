/**
 * An inversion result file (kind "inversion", io/formats/inversion.ts) → the inversion
 * section's input, in the data's units (x as given: nm when the data were in nm), plus what
 * the title page needs (run time, Rg in nm, which estimators ran).
 */
import type { EstimatorBlockFile, InversionResultFile } from '../../io/formats/inversion.js';
import { sig } from '../format.js';
import type { InversionInput, MetricRow } from '../report-inputs.js';

export interface InversionRead {
  inversion?: InversionInput;
  /** Wall time of the whole inversion, or the estimators' own seconds summed (older files). */
  runSeconds?: number;
  runSecondsNote?: string;
  rgNm?: number;
  estimatorNames: string[];
}

function fitRows(e: EstimatorBlockFile, nm: boolean): MetricRow[] {
  const rows: MetricRow[] = [];
  if (e.reducedChi2 !== null) rows.push({ name: 'reduced χ² of the fit', value: sig(e.reducedChi2, 3), unit: '–' });
  if (e.n !== undefined) rows.push({ name: 'data points, degrees of freedom', value: `${e.n}, ${e.dof ?? 'n/a'}` });
  if (e.period !== undefined) rows.push({ name: 'period of the fit', value: nm && e.periodNm !== undefined ? `${sig(e.periodNm, 5)} nm (${sig(e.period, 5)} Rg)` : `${sig(e.period, 5)} Rg` });
  if (e.offset !== undefined) rows.push({ name: 'offset of an A-domain centre', value: nm && e.offsetNm !== undefined ? `${sig(e.offsetNm, 4)} nm (${sig(e.offset, 4)} Rg)` : `${sig(e.offset, 4)} Rg` });
  return rows;
}

/** An inversion result already read through its schema (io/formats/inversion.ts). */
export function readInversion(file: InversionResultFile): InversionRead {
  const names = Object.keys(file.estimators);
  const units = file.input?.units;
  const nm = units?.x === 'nm' && units.rgNm !== undefined;
  const secondsSum = Object.values(file.estimators).reduce((a, e) => a + (e.seconds ?? 0), 0);
  const out: InversionRead = {
    estimatorNames: names,
    rgNm: nm ? units!.rgNm : undefined,
    ...(file.runSeconds !== undefined ? { runSeconds: file.runSeconds } : secondsSum > 0 ? { runSeconds: secondsSum, runSecondsNote: 'the estimators only; this run did not record its whole wall time' } : {}),
  };
  const main = file.estimators.classical ?? Object.values(file.estimators)[0];
  if (!main?.points || !main.fitCurve) return out;
  const p = main.points;
  const i68 = main.intervals?.['68.3%'];
  const i95 = main.intervals?.['95%'];
  out.inversion = {
    quantity: 'φA',
    data: p.x.map((x, i) => ({ x, value: p.phiA[i], sigma: p.sigma[i] })),
    fitted: main.fitCurve.x.map((x, i) => ({ x, value: main.fitCurve!.phiA[i] })),
    residuals: p.x.map((x, i) => ({ x, normalized: p.residual[i] / p.sigma[i] })),
    profileLikelihood: (main.profileLikelihood ?? []).map((q) => ({ chiN: q.chiN, deltaChi2: q.deltaChi2 })),
    interval: { lower: main.interval[0] ?? Number.NaN, upper: main.interval[1] ?? Number.NaN, level: 0.683, threshold: i68?.deltaChi2 ?? 1 },
    ...(main.interval95 ? { interval95: { lower: main.interval95[0] ?? Number.NaN, upper: main.interval95[1] ?? Number.NaN, threshold: i95?.deltaChi2 ?? 3.841 } } : {}),
    bestChiN: main.chiN,
    estimators: Object.entries(file.estimators).map(([name, e]) => ({ name, chiN: e.chiN, lower: e.interval[0] ?? undefined, upper: e.interval[1] ?? undefined, note: e.intervalMethod })),
    xUnit: nm ? 'nm' : 'Rg',
    ...(nm ? { rgNm: units!.rgNm } : {}),
    fitRows: fitRows(main, nm),
  };
  return out;
}

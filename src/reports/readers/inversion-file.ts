/**
 * An inversion result file (kind "inversion", io/formats/inversion.ts) → the inversion
 * section's input, in the data's units (x as given: nm when the data were in nm), plus what
 * the title page needs (run time, Rg in nm, which estimators ran).
 */
import type { EstimatorBlockFile, InversionResultFile } from '../../io/formats/inversion.js';
import { sig } from '../format.js';
import type { InversionInput, MetricRow } from '../report-inputs.js';
import { PARAMETER_LABELS } from '../../surrogate/parameter-space.js';

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

/** The assumed-inputs block of the classical estimator as the inversion format carries it (inverse/assumed-inputs.ts writes it). */
interface AssumedBlock {
  effects?: { key: string; value: number; sd: number; chiNAtMinus: number; chiNAtPlus: number; chiNSd: number }[];
  rgProfile?: { value: number; sd: number; rgNmAtBest: number };
  statisticalInterval?: [number, number];
  sensitivity?: { relativeStep: number; chiNAtMinus: number; chiNAtPlus: number };
}

const INPUT_NAMES = (key: 'f' | 'segmentRatio') => PARAMETER_LABELS[key].symbol;

/**
 * What the χN rests on, for the title page: each assumed input (Rg when x is in nm, f, the
 * segment-length ratio) with how it entered (exact, or with an sd profiled into the interval)
 * and its measured effect on χN, and the period mode.
 */
function restsOn(file: InversionResultFile, e: EstimatorBlockFile): string[] {
  const a = (e as { assumedInputs?: AssumedBlock }).assumedInputs;
  const chain = ((file.config as { system?: { chain?: { f?: number; segmentRatio?: number } } }).system?.chain ?? {}) as { f?: number; segmentRatio?: number };
  const units = file.input.units;
  const lines: string[] = [];
  const effect = (key: string) => a?.effects?.find((x) => x.key === key);
  if (units.x === 'nm' && units.rgNm !== undefined) {
    if (a?.rgProfile) lines.push(`Rg = ${sig(a.rgProfile.value, 4)} ± ${sig(a.rgProfile.sd, 2)} nm, profiled exactly into the interval (best Rg ${sig(a.rgProfile.rgNmAtBest, 4)} nm).`);
    else if (a?.sensitivity) {
      const pct = sig(a.sensitivity.relativeStep * 100, 2);
      lines.push(`Rg = ${sig(units.rgNm, 4)} nm taken as exact: Rg ${pct} % smaller gives χN = ${sig(a.sensitivity.chiNAtMinus, 4)}, ${pct} % larger gives ${sig(a.sensitivity.chiNAtPlus, 4)}; the interval does not include this (give --rg-nm-sd, or --period free to remove the dependence).`);
    } else lines.push(`Rg = ${sig(units.rgNm, 4)} nm sets the length scale; with the period ${e.periodMode === 'free' ? 'fitted (free), χN does not depend on it' : 'given, χN depends on it through the period in Rg'}.`);
  } else lines.push('x in Rg: no Rg in nm enters the fit.');
  for (const key of ['f', 'segmentRatio'] as const) {
    const x = effect(key);
    const value = key === 'f' ? chain.f : (chain.segmentRatio ?? 1);
    if (x) lines.push(`${INPUT_NAMES(key)} = ${sig(x.value, 4)} ± ${sig(x.sd, 2)}: χN = ${sig(x.chiNAtMinus, 4)} at −1 sd and ${sig(x.chiNAtPlus, 4)} at +1 sd; adds an sd of ${sig(x.chiNSd, 2)} to χN, included in the interval.`);
    else if (value !== undefined) lines.push(`${INPUT_NAMES(key)} = ${sig(value, 4)} taken as exact (an sd with --${key === 'f' ? 'f-sd' : 'segment-ratio-sd'} would enter the interval).`);
  }
  if (a?.statisticalInterval && (a.rgProfile || a.effects?.length)) {
    const dataOnly = (e as { chiNDataOnly?: number }).chiNDataOnly;
    lines.push(`From the data alone (inputs fixed): ${dataOnly !== undefined ? `χN = ${sig(dataOnly, 5)}, ` : ''}68 % interval ${sig(a.statisticalInterval[0], 5)} – ${sig(a.statisticalInterval[1], 5)}${dataOnly !== undefined ? '; the profiles and fields drawn are that fit' : ''}.`);
  }
  lines.push(`Period: ${e.periodMode === 'equilibrium' ? 'the stress-free period of the model at each χN' : e.periodMode === 'free' ? 'fitted to the data' : 'given'}.`);
  lines.push(...(file.estimators.network?.restsOn ?? []));
  return lines;
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
    ...(file.runSeconds !== undefined ? { runSeconds: file.runSeconds, runSecondsNote: 'the whole inversion: every estimator and the assumed-input refits; report rendering not included' } : secondsSum > 0 ? { runSeconds: secondsSum, runSecondsNote: 'the estimators only; this run did not record its whole wall time' } : {}),
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
    restsOn: restsOn(file, main),
  };
  return out;
}

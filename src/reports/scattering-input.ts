/**
 * The report input of a disordered-melt scattering fit (fit-scattering's result.json, schema
 * in io/formats/scattering-fit.ts): per file the data with error bars, the model, the
 * normalised residuals and the profile likelihood of χN; for a series, χN(T) with its band
 * and the predicted transition temperatures. q in the files' unit, T in K.
 */
import type { ScatteringResultFile } from '../io/formats/scattering-fit.js';

export interface ScatteringReportInput {
  qLabel: string;
  fits: {
    label: string;
    q: number[];
    I: number[];
    dI: number[] | null;
    model: number[];
    normalisedResidual: number[];
    profile: { chiN: number; deltaChi2: number }[];
    chiN: number;
    interval: [number, number];
    interval95: [number, number];
    threshold68: number;
  }[];
  series?: {
    points: { T: number; chiN: number; lo: number; hi: number }[];
    band: { T: number; chiN: number; sd: number }[];
    transitions: { label: string; T: number; chiN: number }[];
    summary: string;
  };
}

export function scatteringReportInput(r: ScatteringResultFile): ScatteringReportInput {
  return {
    qLabel: r.fits[0]?.qUnit === 'per_A' ? 'q / Å⁻¹' : 'q / nm⁻¹',
    fits: r.fits.map((f) => ({
      label: `${f.file}${f.temperature !== null ? ` at ${f.temperature} K` : ''}`,
      q: f.points.q,
      I: f.points.I,
      dI: f.points.dI,
      model: f.points.model,
      normalisedResidual: f.points.normalisedResidual,
      profile: f.profileLikelihood,
      chiN: f.chiN,
      interval: f.interval,
      interval95: f.interval95,
      threshold68: f.intervals['68.3%'].deltaChi2,
    })),
    ...(r.series
      ? {
          series: {
            points: r.fits.map((f) => ({ T: f.temperature!, chiN: f.chiN, lo: f.interval[0], hi: f.interval[1] })),
            band: r.series.band,
            transitions: [r.series.meanField, ...(r.series.fluctuationCorrected ? [r.series.fluctuationCorrected] : [])].map((t) => ({ label: t.label, T: t.temperature, chiN: t.chiN })),
            summary: `χN(T) = a/T + b: a = ${r.series.chiNLine.a.toPrecision(5)} K, b = ${r.series.chiNLine.b.toPrecision(5)}`,
          },
        }
      : {}),
  };
}

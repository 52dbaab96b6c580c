/**
 * The value of a scattering fit's result file (its format, and the fit-<k>.csv written from
 * it, in io/formats/scattering-fit.ts) and the text summary. q is given back in the units of
 * the file's q column; Rg in nm.
 */
import { SCATTERING_FIT_VERSION, scatteringResultSchema } from '../../io/formats/scattering-fit.js';
import type { ScatteringResultFile } from '../../io/formats/scattering-fit.js';
import { throughSchema } from '../../io/formats/file-format.js';
import type { Provenance } from '../../io/versions.js';
import type { ScatteringConfig } from '../../io/schemas/scattering-config.js';
import type { FiellerSet } from '../../numerics/fieller.js';
import type { ScatteringData } from './scattering-csv.js';
import { qUnitLabel } from './scattering-csv.js';
import type { ScatteringSeriesResult } from './scattering-series.js';

export const SCATTERING_ASSUMPTIONS = [
  'the melt is disordered and incompressible, and mean-field RPA (Leibler 1980) describes its composition fluctuations: no fluctuation corrections, so χN fitted near the transition is an effective χN',
  'the chain is the given monodisperse linear A/B block chain with Gaussian blocks (f, segment-length ratio as configured); polydispersity broadens the peak and biases χN low',
  'I(q) = K·S(q)/N + bg with a q-independent background and contrast factor; the given q resolution is Gaussian',
  'χ is per reference volume of the chain (χN with N the number of reference segments)',
];

export function scatteringResult(datas: ScatteringData[], config: ScatteringConfig, provenance: Provenance, r: ScatteringSeriesResult, seconds: number): ScatteringResultFile {
  const fits = r.fits.map((f, i) => {
    const d = datas[i];
    const toFile = 1 / d.toPerNm;
    return {
      file: f.source,
      temperature: f.temperature ?? null,
      chiN: f.chiN,
      interval: f.interval,
      interval95: f.interval95,
      intervals: f.intervals,
      rgNm: f.rgNm,
      rgMode: f.rgMode,
      K: f.K,
      background: f.background,
      chiNSpinodal: f.chiNSpinodal,
      qStar: f.qStarPerNm * toFile,
      qUnit: d.qUnit,
      chi2: f.chi2,
      reducedChi2: f.reducedChi2,
      n: f.n,
      p: f.p,
      dof: f.dof,
      sigma: f.sigma,
      profileLikelihood: f.profile,
      points: {
        q: Array.from(d.qRaw),
        I: Array.from(d.intensity),
        dI: d.sigma ? Array.from(d.sigma) : null,
        model: Array.from(f.model),
        residual: Array.from(f.residual),
        normalisedResidual: Array.from(f.normalisedResidual),
      },
      warnings: f.warnings,
      notes: f.notes,
      evaluations: f.evaluations,
      seconds: f.seconds,
    };
  });
  const s = r.series;
  const series = s
    ? {
        chiNLine: { a: s.a, b: s.b, covariance: s.covariance, intervals: s.intervals, note: 'χN(T) = a/T + b, T in K' },
        chi: s.chi ? { N: s.chi.N, A: s.chi.A, B: s.chi.B, intervals: s.chi.intervals, note: 'χ(T) = A/T + B, A in K' } : null,
        chi2: s.chi2,
        dof: s.dof,
        reducedChi2: s.reducedChi2,
        meanField: s.meanField,
        fluctuationCorrected: s.fluctuationCorrected ?? null,
        band: bandPoints(r),
        warnings: s.warnings,
        notes: s.notes,
        seconds: r.seriesSeconds ?? 0,
      }
    : null;
  return throughSchema(scatteringResultSchema, { kind: 'fit-scattering-result', version: SCATTERING_FIT_VERSION, provenance, config, assumptions: SCATTERING_ASSUMPTIONS, fits, series, seconds });
}

/** The fitted line and its one-sigma band over the measured temperatures and out to the predicted transition. */
function bandPoints(r: ScatteringSeriesResult): { T: number; chiN: number; sd: number }[] {
  const s = r.series!;
  const temps = r.fits.map((f) => f.temperature!);
  let lo = Math.min(...temps);
  let hi = Math.max(...temps);
  for (const t of [s.meanField.temperature, s.fluctuationCorrected?.temperature]) {
    if (t !== undefined && t > 0 && t < 10 * hi) {
      lo = Math.min(lo, t);
      hi = Math.max(hi, t);
    }
  }
  const pad = 0.05 * (hi - lo);
  return Array.from({ length: 41 }, (_, k) => {
    const T = lo - pad + ((hi - lo + 2 * pad) * k) / 40;
    return { T, ...s.band(T) };
  });
}

const g = (v: number, d = 5) => v.toPrecision(d);
const pair = (r: [number, number], d = 5) => `[${g(r[0], d)}, ${g(r[1], d)}]`;
const fieller = (f: FiellerSet) => (f.kind === 'interval' ? `[${f.lo.toFixed(1)}, ${f.hi.toFixed(1)}] K` : 'unbounded (no finite interval)');

export function scatteringSummary(res: ScatteringResultFile): string {
  const out: string[] = [];
  for (const f of res.fits) {
    out.push(`${f.file}${f.temperature !== null ? ` (T = ${f.temperature} K)` : ''}:`);
    out.push(`  χN = ${g(f.chiN)}   68.3 % ${pair(f.interval)}   95 % ${pair(f.interval95)}   (profile likelihood; spinodal (χN)_s = ${g(f.chiNSpinodal)})`);
    out.push(`  Rg = ${g(f.rgNm)} nm (${f.rgMode}), q* = ${g(f.qStar)} ${qUnitLabel(f.qUnit)}, K = ${g(f.K)}, background = ${g(f.background)}`);
    out.push(`  χ² = ${g(f.chi2)}, reduced χ² = ${g(f.reducedChi2, 4)} (${f.dof} dof; sigma ${f.sigma.source === 'column' ? 'from the dI column' : `estimated, ${g(f.sigma.value!, 3)}`}), ${f.seconds.toFixed(2)} s`);
    for (const w of f.warnings) out.push(`  WARNING: ${w}`);
    for (const n of f.notes) out.push(`  note: ${n}`);
  }
  const s = res.series;
  if (s) {
    out.push('');
    out.push(`temperature series (${res.fits.length} temperatures, ${s.seconds.toFixed(3)} s):`);
    out.push(`  χN(T) = a/T + b:  a = ${g(s.chiNLine.a)} K  68.3 % ${pair(s.chiNLine.intervals.a['68.3%'])}  95 % ${pair(s.chiNLine.intervals.a['95%'])}`);
    out.push(`                    b = ${g(s.chiNLine.b)}  68.3 % ${pair(s.chiNLine.intervals.b['68.3%'])}  95 % ${pair(s.chiNLine.intervals.b['95%'])}`);
    if (s.chi) {
      out.push(`  χ(T) = A/T + B (N = ${s.chi.N}):  A = ${g(s.chi.A)} K  95 % ${pair(s.chi.intervals.A['95%'])};  B = ${g(s.chi.B)}  95 % ${pair(s.chi.intervals.B['95%'])}`);
    }
    if (s.reducedChi2 !== null) out.push(`  reduced χ² of the line = ${g(s.reducedChi2, 4)} (${s.dof} dof)`);
    for (const t of [s.meanField, s.fluctuationCorrected]) {
      if (!t) continue;
      out.push(`  ${t.label}:`);
      out.push(`    χN = ${g(t.chiN)} at T = ${t.temperature.toFixed(1)} K   68.3 % ${fieller(t.intervals['68.3%'])}   95 % ${fieller(t.intervals['95%'])} (Fieller)`);
    }
    for (const w of s.warnings) out.push(`  WARNING: ${w}`);
    for (const n of s.notes) out.push(`  note: ${n}`);
  }
  out.push('');
  out.push('assumptions:');
  for (const a of res.assumptions) out.push(`  - ${a}`);
  out.push(`total time ${res.seconds.toFixed(2)} s`);
  return `${out.join('\n')}\n`;
}

/**
 * The result file kind "inversion": one block per estimator under `estimators` (classical
 * now; the network estimator slots in beside it with the same fields), an `agreement`
 * block comparing whichever are present, the model's assumptions, and the fitted-profile
 * CSV. Lengths are in Rg, with nm copies when the input was in nm.
 */
import { truthText } from './truth-comparison.js';
import type { TruthComparison } from './truth-comparison.js';
import type { NetworkEstimate, NetworkRun } from './network-estimator.js';
import type { Provenance } from '../io/versions.js';
import { INVERSION_VERSION, inversionResultSchema } from '../io/formats/inversion.js';
import { formatText } from '../io/formats/file-format.js';
import type { ClassicalEstimate } from './classical.js';
import { fieldInDataFrame } from './classical.js';
import type { ProfileData } from './profile-csv.js';
import { modelAssumptions } from '../physics/model-assumptions.js';
import type { AssumedInputsReport } from './assumed-inputs.js';

/** The offset moved by whole periods to the first A-domain centre at or after the first data point (inside the data range). */
export function offsetInData(offset: number, period: number, x0: number): number {
  if (!(period > 0)) return offset;
  return offset + Math.ceil((x0 - offset) / period - 1e-12) * period;
}

/** What the fitted χN rests on: printed with every result (the one list in physics/model-assumptions.ts). */
export const ASSUMPTIONS: readonly string[] = modelAssumptions('periodic', true);

/** One estimator's block: the fields every estimator reports (a network block adds its own extras). */
export type EstimatorBlock = Pick<
  ClassicalEstimate,
  'chiN' | 'interval' | 'interval95' | 'intervals' | 'offset' | 'period' | 'periodMode' | 'chi2' | 'reducedChi2' | 'rss' | 'rmsResidual' | 'n' | 'p' | 'dof' | 'sigma' | 'seconds'
> & {
  method: string;
  status: 'ok';
  /** How the interval was obtained (profile likelihood here; e.g. seed spread for a network). */
  intervalMethod: string;
  offsetNm?: number;
  periodNm?: number;
  [extra: string]: unknown;
};

export interface Agreement {
  present: string[];
  compared: boolean;
  note?: string;
  pairs?: {
    a: string;
    b: string;
    difference: number;
    relativeDifference: number;
    /** Difference over the root-sum-square of the two one-sigma half-widths. */
    z: number;
    intervalsOverlap: boolean;
    eachWithinOthersInterval: boolean;
  }[];
}

const halfWidth = (e: EstimatorBlock) => 0.5 * (e.interval[1] - e.interval[0]);

/** Pairwise comparison of the estimators present (none needed with one). */
export function agreement(estimators: Record<string, EstimatorBlock>): Agreement {
  const names = Object.keys(estimators);
  if (names.length < 2) return { present: names, compared: false, note: 'one estimator ran: an agreement needs two (--method both, once the network estimator is available)' };
  const pairs: NonNullable<Agreement['pairs']> = [];
  for (let i = 0; i < names.length; i++) {
    for (let j = i + 1; j < names.length; j++) {
      const a = estimators[names[i]];
      const b = estimators[names[j]];
      const d = b.chiN - a.chiN;
      const inA = a.interval[0] <= b.chiN && b.chiN <= a.interval[1];
      const inB = b.interval[0] <= a.chiN && a.chiN <= b.interval[1];
      pairs.push({
        a: names[i],
        b: names[j],
        difference: d,
        relativeDifference: d / a.chiN,
        z: d / Math.hypot(halfWidth(a), halfWidth(b)),
        intervalsOverlap: a.interval[0] <= b.interval[1] && b.interval[0] <= a.interval[1],
        eachWithinOthersInterval: inA && inB,
      });
    }
  }
  return { present: names, compared: true, pairs };
}

export function classicalBlock(est: ClassicalEstimate, data: ProfileData, assumed?: AssumedInputsReport): EstimatorBlock {
  const nm = data.units.x === 'nm' ? data.units.rgNm! : undefined;
  const offset = offsetInData(est.offset, est.period, data.x[0]);
  const withInputs = assumed?.intervals !== undefined;
  const x = new Float64Array(est.solution.nx);
  for (let j = 0; j < x.length; j++) x[j] = data.x[0] + (j * est.period) / x.length;
  const field = (v: Float64Array) => Array.from(fieldInDataFrame(est, v, x));
  const free = est.periodMode === 'free' ? ' and the period' : '';
  return {
    method: 'classical',
    status: 'ok',
    chiN: withInputs ? assumed!.chiN! : est.chiN,
    ...(withInputs ? { chiNDataOnly: est.chiN } : {}),
    interval: withInputs ? assumed!.interval! : est.interval,
    interval95: withInputs ? assumed!.interval95! : est.interval95,
    intervalMethod: `profile likelihood of χN (offset${free} minimised at each χN); the ends are where Δχ² reaches the level, found by Brent root finding; levels ${est.sigma.source === 'column' ? 'Δχ² = 1 and 3.841 (χ² with one degree of freedom)' : `t² with n − p = ${est.dof} degrees of freedom (sigma estimated)`}${withInputs ? `; uncertain inputs (${[...(assumed!.rgProfile ? ['rgNm'] : []), ...assumed!.effects.map((e) => e.key)].join(', ')}) included by ${assumed!.method}` : ''}`,
    intervals: withInputs ? assumed!.intervals! : est.intervals,
    ...(assumed ? { assumedInputs: assumed } : {}),
    offset,
    period: est.period,
    ...(nm ? { offsetNm: offset * nm, periodNm: est.period * nm } : {}),
    periodMode: est.periodMode,
    chi2: est.chi2,
    reducedChi2: est.reducedChi2,
    rss: est.rss,
    rmsResidual: est.rmsResidual,
    n: est.n,
    p: est.p,
    dof: est.dof,
    sigma: est.sigma,
    seconds: est.seconds,
    chiNRange: est.chiNRange,
    resolution: est.resolution,
    cost: est.cost,
    profileLikelihood: est.profile,
    freeEnergy: est.solution.freeEnergy,
    freeEnergyDisordered: est.solution.freeEnergyDisordered,
    fitCurve: fitCurve(est, data),
    points: {
      note: 'per data point: x as given, data, sigma (the column or the estimate), fit (the model compared with the data), residual = data − fit',
      x: Array.from(data.xRaw),
      phiA: Array.from(data.phi),
      sigma: data.sigma ? Array.from(data.sigma) : new Array<number>(data.x.length).fill(est.sigma.value!),
      fit: Array.from(est.fit),
      residual: Array.from(est.residual),
    },
    fields: {
      note: 'the best-fit self-consistent solution over one period, on the data coordinate (Rg) starting at the first data point; w in kT per chain, gauge: mean (wA + wB)/2 = 0',
      x: Array.from(x),
      phiA: field(est.solution.phi.A),
      wA: field(est.solution.w.A),
      wB: field(est.solution.w.B),
    },
    notes: est.notes,
    warnings: est.warnings,
  };
}

/** The fitted (blurred) model on a fine grid over the data range, x in the units of the data. */
function fitCurve(est: ClassicalEstimate, data: ProfileData, points = 400): { x: number[]; phiA: number[] } {
  const n = data.x.length;
  const x = new Float64Array(points);
  for (let i = 0; i < points; i++) x[i] = data.x[0] + ((data.x[n - 1] - data.x[0]) * i) / (points - 1);
  const v = est.model.blurred(est.resolution).evaluateShifted(x, est.offset, new Float64Array(points));
  const scale = data.units.x === 'nm' ? data.units.rgNm! : 1;
  return { x: Array.from(x, (t) => t * scale), phiA: Array.from(v) };
}

export interface InversionResult {
  kind: 'inversion';
  version: typeof INVERSION_VERSION;
  provenance: Provenance;
  input: {
    file: string;
    n: number;
    xRange: [number, number];
    units: ProfileData['units'];
    sigmaColumn: boolean;
  };
  config: Record<string, unknown>;
  assumptions: string[];
  estimators: Record<string, EstimatorBlock>;
  agreement: Agreement;
  /** Synthetic profiles only: the estimates against the truth that made the data. */
  truth?: TruthComparison;
  /** Wall time (s) of the whole inversion (every estimator), when the command recorded it. */
  runSeconds?: number;
}

export function inversionResult(data: ProfileData, config: Record<string, unknown>, provenance: Provenance, estimators: Record<string, EstimatorBlock>, truth?: TruthComparison): InversionResult {
  return {
    kind: 'inversion',
    version: INVERSION_VERSION,
    provenance,
    input: {
      file: data.source,
      n: data.x.length,
      xRange: [data.xRaw[0], data.xRaw[data.xRaw.length - 1]],
      units: data.units,
      sigmaColumn: data.sigma !== undefined,
    },
    config,
    assumptions: [...ASSUMPTIONS],
    estimators,
    agreement: agreement(estimators),
    ...(truth ? { truth } : {}),
  };
}

/** result.json: the result through its file schema (io/formats/inversion.ts). */
export function inversionResultText(result: InversionResult, indent = 1): string {
  return formatText(inversionResultSchema, result, indent);
}

/** x (as given), data, sigma (column or estimated), fit, residual = data − fit; and the unblurred model when a resolution was applied. */
export function fitCsv(data: ProfileData, est: ClassicalEstimate): string {
  const blur = est.resolution > 0;
  const rows = [`x,phiA,sigma,fit,residual${blur ? ',model_unblurred' : ''}`];
  for (let i = 0; i < data.x.length; i++) {
    const sigma = data.sigma ? data.sigma[i] : est.sigma.value!;
    const cells = [data.xRaw[i], data.phi[i], sigma, est.fit[i], est.residual[i]].map((v) => String(v));
    if (blur) cells.push(String(est.fitUnblurred[i]));
    rows.push(cells.join(','));
  }
  return `${rows.join('\n')}\n`;
}

/** The human summary printed on stdout. Lengths in the data's units first, Rg second. */
export function summaryText(result: InversionResult): string {
  const lines: string[] = [];
  const u = result.input.units;
  const len = (rg: number, nmValue: number | undefined) => (nmValue !== undefined ? `${nmValue.toPrecision(6)} nm (${rg.toPrecision(6)} Rg)` : `${rg.toPrecision(6)} Rg`);
  for (const [name, e] of Object.entries(result.estimators)) {
    const f = (v: number) => v.toPrecision(6);
    lines.push(`${name} estimate: χN = ${f(e.chiN)}`);
    const oneSeed = e.method === 'network' && !(e.interval[1] > e.interval[0]);
    if (oneSeed) lines.push('  no interval: one seed has no spread (run --seeds 3 or more for a seed spread)');
    else {
      const assumed = e.assumedInputs as AssumedInputsReport | undefined;
      const how = e.method === 'network' ? `seed spread, ${(e.runs as unknown[]).length} seeds: an optimisation spread, not a statistical interval` : assumed?.intervals ? `profile likelihood, including ${[...(assumed.rgProfile ? [`Rg ${assumed.rgProfile.value} ± ${assumed.rgProfile.sd} nm (${assumed.rgProfile.source}), profiled exactly`] : []), ...assumed.effects.map((x) => `${x.key} ± ${x.sd} (${x.source})`)].join(', ')}` : 'profile likelihood';
      lines.push(`  68.3% interval [${f(e.interval[0])}, ${f(e.interval[1])}], 95% interval [${f(e.interval95[0])}, ${f(e.interval95[1])}] (${how})`);
      if (assumed?.intervals) {
        lines.push(`  from the data alone (inputs fixed at their values): χN = ${f(e.chiNDataOnly as number)}, 68.3% [${f(assumed.statisticalInterval[0])}, ${f(assumed.statisticalInterval[1])}], 95% [${f(assumed.statisticalInterval95[0])}, ${f(assumed.statisticalInterval95[1])}]`);
        if (assumed.rgProfile) lines.push(`  Rg profiled out: best Rg ${assumed.rgProfile.rgNmAtBest.toPrecision(5)} nm within its constraint ${assumed.rgProfile.value} ± ${assumed.rgProfile.sd} nm`);
        for (const x of assumed.effects) {
          lines.push(`  ${x.key} = ${x.value} ± ${x.sd}: χN = ${f(x.chiNAtMinus)} at −1 sd, ${f(x.chiNAtPlus)} at +1 sd; adds sd ${x.chiNSd.toPrecision(3)} to χN; the data pull ${x.key} by ${x.valueShift.toPrecision(3)}, moving χN by ${x.chiNShift.toPrecision(3)}`);
        }
      }
      if (assumed?.sensitivity) lines.push(`  SENSITIVITY: ${assumed.sensitivity.note}`);
    }
    lines.push(`  period ${len(e.period, e.periodNm)} (${e.periodMode}), offset ${len(e.offset, e.offsetNm)} (centre of an A-rich domain, inside the data range)`);
    if (e.method === 'network') lines.push(`  rms residual ${e.rmsResidual.toExponential(3)} against the data; ${e.p === 3 ? 'offset and period fitted with χN' : e.p === 2 ? 'offset fitted with χN, period from the classical fit' : 'offset and period from the classical fit'}`);
    else lines.push(
      `  χ² = ${e.chi2.toPrecision(5)} for n − p = ${e.dof} (n = ${e.n}, p = ${e.p}), reduced χ² = ${e.reducedChi2.toPrecision(4)}, rms residual ${e.rmsResidual.toExponential(3)}, sigma ${e.sigma.source === 'column' ? 'from the column' : `estimated ${e.sigma.value!.toExponential(3)}`}`,
    );
    const extraSeconds = (e.assumedInputs as AssumedInputsReport | undefined)?.seconds;
    lines.push(`  ${e.seconds.toFixed(2)} s${extraSeconds ? ` for the fit, + ${extraSeconds.toFixed(2)} s for the assumed inputs (refits, Rg profile)` : ''}`);
    for (const w of (e.warnings as string[] | undefined) ?? []) lines.push(`  WARNING: ${w}`);
    for (const n of (e.notes as string[]) ?? []) lines.push(`  note: ${n}`);
  }
  for (const p of result.agreement.pairs ?? []) lines.push(agreementText(p));
  if (u.x === 'nm') lines.push(`x in nm, Rg = ${u.rgNm!.toPrecision(6)} nm (${u.rgFrom})`);
  if (result.truth) lines.push(truthText(result.truth).trimEnd());
  lines.push('assumptions (the fitted χN holds only within them):');
  for (const a of result.assumptions) lines.push(`  - ${a}`);
  return `${lines.join('\n')}\n`;
}

/** Whether two estimates agree, in words: the difference in units of the combined one-sigma half-widths, and the overlap. */
export function agreementText(p: NonNullable<Agreement['pairs']>[number]): string {
  const verdict = !Number.isFinite(p.z)
    ? 'cannot be judged (an estimate without an interval)'
    : Math.abs(p.z) > 2 || !p.intervalsOverlap
      ? 'DISAGREE'
      : Math.abs(p.z) > 1
        ? 'differ by more than their combined one-sigma uncertainty'
        : 'agree within their combined one-sigma uncertainty';
  return `${p.a} vs ${p.b}: difference ${p.difference.toPrecision(4)} (${(100 * p.relativeDifference).toPrecision(3)} %), ${Number.isFinite(p.z) ? `${Math.abs(p.z).toPrecision(3)} × the combined sd` : 'no combined sd'}, ${Number.isFinite(p.z) ? `68.3% intervals ${p.intervalsOverlap ? 'overlap' : 'do not overlap'}: ` : ''}the estimates ${verdict}`;
}

/**
 * The network estimator's block. Its interval is the seed spread (mean ± one standard
 * deviation, and ± 1.96 of them), an optimisation spread rather than a statistical interval:
 * the block says so. Offset and period are the classical ones it was given, except those every
 * run fitted beside χN (the least-squares strategy: the offset, and a free period; their means).
 */
export function networkBlock(ne: NetworkEstimate, cl: ClassicalEstimate, data: ProfileData): EstimatorBlock {
  const nm = data.units.x === 'nm' ? data.units.rgNm! : undefined;
  const rms = Math.sqrt(ne.runs.reduce((a, r) => a + r.rmsResidual ** 2, 0) / ne.runs.length);
  const n = data.x.length;
  // One seed has no spread: no interval at all rather than a zero-width one (NaN, written as null).
  const sd = ne.runs.length > 1 ? ne.spread : Number.NaN;
  const open = { lo: false, hi: false };
  const mean = (v: (r: NetworkRun) => number | undefined) => (ne.runs.every((r) => v(r) !== undefined) ? ne.runs.reduce((a, r) => a + v(r)!, 0) / ne.runs.length : undefined);
  const fittedPeriod = mean((r) => r.period);
  const fittedOffset = mean((r) => r.offset);
  const period = fittedPeriod ?? cl.period;
  const offset = offsetInData(fittedOffset ?? cl.offset, period, data.x[0]);
  // Fitted parameters: χN, then the offset and the period where the runs fitted them.
  const p = 1 + (fittedOffset !== undefined ? 1 : 0) + (fittedPeriod !== undefined ? 1 : 0);
  return {
    method: 'network',
    status: 'ok',
    chiN: ne.chiN,
    interval: [ne.chiN - sd, ne.chiN + sd],
    interval95: [ne.chiN - 1.96 * sd, ne.chiN + 1.96 * sd],
    intervals: {
      '68.3%': { lo: ne.chiN - sd, hi: ne.chiN + sd, probability: 0.683, deltaChi2: Number.NaN, limitedByRange: open },
      '95%': { lo: ne.chiN - 1.96 * sd, hi: ne.chiN + 1.96 * sd, probability: 0.95, deltaChi2: Number.NaN, limitedByRange: open },
    },
    intervalMethod:
      ne.runs.length > 1 ? `spread of ${ne.runs.length} seeded trainings (mean ± sd, ± 1.96 sd): an optimisation spread, not a statistical interval` : 'none: one seeded training has no spread (run 3 or more seeds)',
    offset,
    period,
    ...(nm ? { offsetNm: offset * nm, periodNm: period * nm } : {}),
    periodMode: cl.periodMode,
    chi2: Number.NaN,
    reducedChi2: Number.NaN,
    rss: rms * rms * n,
    rmsResidual: rms,
    n,
    p,
    dof: n - p,
    sigma: cl.sigma,
    seconds: ne.seconds,
    restsOn: ne.restsOn,
    backend: ne.backend,
    tfjs: ne.tfjs,
    chiNStart: ne.chiNStart,
    runs: ne.runs.map((r) => ({ seed: r.seed, chiN: r.chiN, rmsResidual: r.rmsResidual, seconds: r.seconds, trajectory: r.trajectory })),
    fields: { note: 'w_A − w_B of the first seed on the model cell grid (Rg, cell frame), kT', x: Array.from(ne.x), exchange: Array.from(ne.runs[0].exchange) },
    notes: ne.notes,
  };
}

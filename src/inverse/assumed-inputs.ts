/**
 * What the fitted χN owes to the inputs the user assumed: Rg in nm (which sets the scale of
 * x), the A fraction f and the segment-length ratio b_A/b_B (which set the model).
 *
 * With an uncertainty (a standard deviation s) on an input θ, the χN interval includes it by
 * the profile likelihood with θ as a nuisance parameter under a Gaussian constraint term
 * ((θ − θ₀)/s)² (Cowan, Statistical Data Analysis (1998), §6.11 and §9.2), evaluated in
 * the local quadratic approximation: two refits at θ₀ ± s give the shift of the best χN,
 * k = dχ̂N/dθ, and the data's own curvature in θ, h = ½ d²χ²_min/dθ² (≥ 0). For a χ² that is
 * quadratic in (χN, θ), χ²_min(θ₀ + δ) − χ²_min(θ₀) = g δ + h δ² (g, h from the two refits)
 * and profiling θ out exactly gives
 *   Δχ²(χN) = (χN − χ̂N − k δ*)² / (w² + k² v),   v = 1/(h + 1/s²),  δ* = −g v / 2,
 * where w is the half-width from the fit at θ₀: the centre moves by k δ* (the data pull θ
 * within its constraint) and each end of an interval of level d lies at the centre
 * ∓ sqrt(w² + d k² v). Several inputs add their k² v terms (their
 * cross-terms are neglected: each is profiled at the others' values). The two refits also
 * show how far the response is from linear (χ̂N at −s and +s are reported).
 *
 * Without an uncertainty on Rg, when the period is tied to the equilibrium period (x in nm),
 * the output states the sensitivity: χ̂N refitted at Rg × (1 ± 5 %), since χN then rests
 * almost entirely on the assumed Rg; a fitted period (`--period free`) removes that.
 */
import type { ClassicalEstimate, ClassicalSettings, ModelSet } from './classical.js';
import { createModels, estimateClassical } from './classical.js';
import type { ProfileData } from './profile-csv.js';
import type { ChainSpec } from '../physics/chain-schema.js';
import { InputError } from '../io/errors.js';

export type AssumedKey = 'rgNm' | 'f' | 'segmentRatio';

export interface AssumedInput {
  key: AssumedKey;
  /** The flag or config path that gave the standard deviation (named in the output). */
  source: string;
  value: number;
  sd: number;
}

export interface AssumedInputEffect {
  key: AssumedKey;
  source: string;
  value: number;
  sd: number;
  /** Best χN refitted at value − sd and value + sd. */
  chiNAtMinus: number;
  chiNAtPlus: number;
  /** dχ̂N/dθ by the central difference. */
  slope: number;
  /** The data's own constraint on θ: ½ d²χ²_min/dθ² (0 when the data cannot tell). */
  dataCurvature: number;
  /** sqrt(k² v): the standard deviation this input adds to χN. */
  chiNSd: number;
  /** The data's pull on θ within its constraint, δ*, and the shift k δ* it gives χN. */
  valueShift: number;
  chiNShift: number;
}

export interface Sensitivity {
  key: 'rgNm';
  relativeStep: number;
  chiNAtMinus: number;
  chiNAtPlus: number;
  note: string;
}

export interface AssumedInputsReport {
  effects: AssumedInputEffect[];
  /** χN with the uncertain inputs profiled out (the centre of the intervals below). */
  chiN?: number;
  /** Rg profiled exactly (rg-profile.ts; x in nm, equilibrium period): its input and the best Rg. */
  rgProfile?: { source: string; value: number; sd: number; rgNmAtBest: number; chiN: number; intervals: ClassicalEstimate['intervals'] };
  /** The intervals with the uncertain inputs profiled out (same shape as the estimate's). */
  intervals?: ClassicalEstimate['intervals'];
  interval?: [number, number];
  interval95?: [number, number];
  /** The statistical-only intervals, for comparison. */
  statisticalInterval: [number, number];
  statisticalInterval95: [number, number];
  method: string;
  sensitivity?: Sensitivity;
  seconds: number;
}

export type Change = Partial<Record<AssumedKey, number>>;

/** A refit of the same data with one assumed input changed; reuses the models when the chain is unchanged. */
export function refitter(data: ProfileData, base: ClassicalSettings, models: ModelSet, onRefit?: (label: string) => void): (change: Change) => ClassicalEstimate {
  const rg0 = data.units.rgNm;
  return (change) => {
    let d = data;
    let s: ClassicalSettings = { ...base, profilePoints: 0 };
    let m = models;
    if (change.rgNm !== undefined) {
      if (!rg0) throw new Error('refitter: an Rg change needs x in nm');
      const r = rg0 / change.rgNm;
      d = { ...data, x: data.xRaw.map((v) => v / change.rgNm!), units: { ...data.units, rgNm: change.rgNm } };
      s = { ...s, resolution: base.resolution * r, period: base.period.mode === 'given' ? { mode: 'given', value: base.period.value * r } : base.period };
    }
    if (change.f !== undefined || change.segmentRatio !== undefined) {
      s = { ...s, chain: changedChain(base.chain, change) };
      m = createModels(s);
    }
    onRefit?.(Object.entries(change).map(([k, v]) => `${k} = ${v!.toPrecision(5)}`).join(', '));
    return estimateClassical(d, s, m);
  };
}

function changedChain(chain: ChainSpec, change: Change): ChainSpec {
  if (chain.type !== 'diblock' && chain.type !== 'triblock') {
    throw new InputError(`system.chain.type: got ${JSON.stringify(chain.type)}; an uncertainty on f or the segment ratio needs a diblock or triblock chain (a general block list has no single f)`);
  }
  const out = { ...chain };
  if (change.f !== undefined) out.f = change.f;
  if (change.segmentRatio !== undefined) out.segmentRatio = change.segmentRatio;
  return out;
}

/** χ²_min of a fit on the scale of the base fit (the estimated sigma of the base, when it was estimated). */
function chi2On(base: ClassicalEstimate, e: ClassicalEstimate): number {
  return base.sigma.source === 'column' ? e.chi2 : e.rss / (base.sigma.value! * base.sigma.value!);
}

export function assessAssumedInputs(
  base: ClassicalEstimate,
  inputs: AssumedInput[],
  refit: (change: Change) => ClassicalEstimate,
  opts: { sensitivityRg?: number; rgProfile?: AssumedInputsReport['rgProfile'] },
): AssumedInputsReport {
  const t0 = performance.now();
  const effects: AssumedInputEffect[] = [];
  const c0 = chi2On(base, base);
  for (const inp of inputs) {
    const minus = refit({ [inp.key]: inp.value - inp.sd });
    const plus = refit({ [inp.key]: inp.value + inp.sd });
    const slope = (plus.chiN - minus.chiN) / (2 * inp.sd);
    const curvature = Math.max(0, (chi2On(base, plus) + chi2On(base, minus) - 2 * c0) / (2 * inp.sd * inp.sd));
    const gradient = (chi2On(base, plus) - chi2On(base, minus)) / (2 * inp.sd);
    const v = 1 / (curvature + 1 / (inp.sd * inp.sd));
    const valueShift = (-gradient * v) / 2;
    effects.push({
      key: inp.key,
      source: inp.source,
      value: inp.value,
      sd: inp.sd,
      chiNAtMinus: minus.chiN,
      chiNAtPlus: plus.chiN,
      slope,
      dataCurvature: curvature,
      chiNSd: Math.sqrt(slope * slope * v),
      valueShift,
      chiNShift: slope * valueShift,
    });
  }
  const report: AssumedInputsReport = {
    effects,
    statisticalInterval: base.interval,
    statisticalInterval95: base.interval95,
    method:
      'profile likelihood with each uncertain input as a nuisance parameter under a Gaussian constraint, in the local quadratic approximation (refits at the value ± its sd give dχN/dθ and the data’s own curvature in θ); the centre moves by the data’s pull on the input within its constraint, and each interval end lies at the centre ∓ sqrt(w² + Δχ²·k²v)',
    seconds: 0,
  };
  const rp = opts.rgProfile;
  if (rp) {
    report.rgProfile = rp;
    report.method = `exact profile likelihood over Rg under its Gaussian constraint (equilibrium period: Rg only rescales x)${effects.length ? `; then ${report.method}` : ''}`;
  }
  if (effects.length > 0 || rp) {
    const start = rp ?? { chiN: base.chiN, intervals: base.intervals };
    const extra = effects.reduce((a, e) => a + e.chiNSd * e.chiNSd, 0);
    const centre = start.chiN + effects.reduce((a, e) => a + e.chiNShift, 0);
    report.chiN = centre;
    const intervals = {} as ClassicalEstimate['intervals'];
    for (const [name, iv] of Object.entries(start.intervals) as [keyof ClassicalEstimate['intervals'], ClassicalEstimate['intervals']['95%']][]) {
      const lo = centre - Math.sqrt((start.chiN - iv.lo) ** 2 + iv.deltaChi2 * extra);
      const hi = centre + Math.sqrt((iv.hi - start.chiN) ** 2 + iv.deltaChi2 * extra);
      intervals[name] = { ...iv, lo, hi };
    }
    report.intervals = intervals;
    report.interval = [intervals['68.3%'].lo, intervals['68.3%'].hi];
    report.interval95 = [intervals['95%'].lo, intervals['95%'].hi];
  }
  if (opts.sensitivityRg !== undefined) {
    const step = 0.05;
    const rg = opts.sensitivityRg;
    const minus = refit({ rgNm: rg * (1 - step) });
    const plus = refit({ rgNm: rg * (1 + step) });
    report.sensitivity = {
      key: 'rgNm',
      relativeStep: step,
      chiNAtMinus: minus.chiN,
      chiNAtPlus: plus.chiN,
      note: `with the period tied to the equilibrium period, χN rests on the assumed Rg: Rg × 0.95 gives χN = ${minus.chiN.toPrecision(5)}, Rg × 1.05 gives ${plus.chiN.toPrecision(5)} (the interval above does not include this); give --rg-nm-sd to include it, or --period free to remove the dependence`,
    };
  }
  report.seconds = (performance.now() - t0) / 1000;
  return report;
}

/** The uncertain inputs an invert config names (units.rgNmSd, uncertainty.f, uncertainty.segmentRatio), checked. */
export function assumedInputs(
  config: { system: { chain: ChainSpec }; units?: { rgNmSd?: number }; uncertainty?: { f?: number; segmentRatio?: number } },
  units: { x: 'Rg' | 'nm'; rgNm?: number },
  sources: Record<string, string>,
): AssumedInput[] {
  const out: AssumedInput[] = [];
  const chain = config.system.chain;
  const rgSd = config.units?.rgNmSd;
  if (rgSd !== undefined) {
    const src = sources['sd.rgNm'] ?? 'units.rgNmSd';
    if (units.x !== 'nm') throw new InputError(`${src}: got ${rgSd}, but x is in Rg: an uncertainty of Rg in nm needs x in nm (--rg-nm R, or --segments N --segment-length-nm b)`);
    if (!(rgSd < units.rgNm!)) throw new InputError(`${src}: got ${rgSd}; allowed: a standard deviation below Rg = ${units.rgNm} nm`);
    out.push({ key: 'rgNm', source: src, value: units.rgNm!, sd: rgSd });
  }
  const u = config.uncertainty ?? {};
  if (u.f !== undefined || u.segmentRatio !== undefined) {
    if (chain.type !== 'diblock' && chain.type !== 'triblock') {
      const src = sources[u.f !== undefined ? 'sd.f' : 'sd.segmentRatio'];
      throw new InputError(`${src}: an uncertainty of f or of the segment ratio needs a diblock or triblock chain; got system.chain.type ${JSON.stringify(chain.type)}`);
    }
    if (u.f !== undefined) {
      const src = sources['sd.f'] ?? 'uncertainty.f';
      if (!(chain.f - u.f > 0 && chain.f + u.f < 1)) throw new InputError(`${src}: got ${u.f}; allowed: a standard deviation with f ± sd inside (0, 1) (f = ${chain.f})`);
      out.push({ key: 'f', source: src, value: chain.f, sd: u.f });
    }
    if (u.segmentRatio !== undefined) {
      const src = sources['sd.segmentRatio'] ?? 'uncertainty.segmentRatio';
      const ratio = chain.segmentRatio;
      if (!(ratio - u.segmentRatio > 0)) throw new InputError(`${src}: got ${u.segmentRatio}; allowed: a standard deviation below the segment ratio b_A/b_B = ${ratio}`);
      out.push({ key: 'segmentRatio', source: src, value: ratio, sd: u.segmentRatio });
    }
  }
  return out;
}

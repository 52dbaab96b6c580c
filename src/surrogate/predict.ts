/**
 * A surrogate's answer at one parameter point, as `mesofield predict` prints it: the
 * profile and fields on N points of one period, Q, F and the period, with the range check.
 * Units: x and the period in Rg, t = x/L, fields and F in kT per chain.
 */
import { InputError } from '../io/errors.js';
import { formatNumber } from '../io/number-format.js';
import type { ParameterPoint } from './parameter-space.js';
import type { SurrogateModel } from './surrogate-model.js';

export interface Prediction {
  point: ParameterPoint;
  /** Why the point lies outside the trained range (empty inside it). */
  outside: string[];
  phase: string;
  /** L(θ) in Rg, from the anchors' equilibrium periods. */
  period: number;
  Q: number;
  QDagger: number;
  freeEnergy: number;
  freeEnergyDisordered: number;
  /** max |w_out − w| of the surrogate's fields (kT): how far they are from self-consistent. */
  residual: number;
  /** max |φA + φB − 1| of the single-chain solve in the surrogate's fields. */
  incompressibilityMax: number;
  /** Extrapolated answers only: the checks it failed (read it as unreliable). */
  warnings: string[];
  x: number[];
  t: number[];
  phiA: number[];
  phiB: number[];
  wA: number[];
  wB: number[];
  /** Wall time of this query (fields and propagator solve), s. */
  seconds: number;
}

/** --points: a whole number from 2 to 8192 (or absent: the training grid). */
export function checkPointCount(n: number | undefined): void {
  if (n !== undefined && (!Number.isInteger(n) || n < 2 || n > 8192)) throw new InputError(`--points: got ${n}; allowed: a whole number from 2 to 8192`);
}

function nextPowerOfTwo(n: number): number {
  let p = 1;
  while (p < n) p *= 2;
  return p;
}

/**
 * The surrogate at p on `points` x values x_j = j·L/points. The propagators are solved on the
 * config's grid or the next power of two ≥ points (the FFT needs one); other point counts
 * are read off by trigonometric interpolation (exact for the band-limited grid values).
 */
/** Limits an extrapolated answer must meet to be shown as an answer (common practice, no source: well above the trained surrogate's own levels). */
export const EXTRAPOLATION_LIMITS = { incompressibility: 1e-3, residual: 0.1 };

export function predictAt(model: SurrogateModel, p: ParameterPoint, opts: { points?: number; allowExtrapolation?: boolean } = {}): Prediction {
  const offFixed = model.space.offFixed(p);
  if (offFixed.length) throw new InputError(`${offFixed.join('\n')}\n--allow-extrapolation does not apply: the surrogate cannot vary a parameter it was trained at one value of`);
  const outside = model.space.outside(p);
  if (outside.length && !opts.allowExtrapolation) {
    throw new InputError(`${outside.join('\n')}\nthe surrogate answers only inside the range it was trained and checked on; pass --allow-extrapolation to predict outside it anyway (its error there is unknown)`);
  }
  checkPointCount(opts.points);
  const n = opts.points ?? model.config.cell.nx;
  const t0 = performance.now();
  const nx = Math.max(model.config.cell.nx, nextPowerOfTwo(n));
  const [sol] = model.solutions([p], nx);
  const L = sol.period;
  // One period per surrogate cell (its solutions are single-period lamellae), so L is the cell length.
  const x = sol.cell.gridWith(n);
  const at = (u: Float64Array) => Array.from(n === nx ? u : sol.cell.interpolate(u, x));
  const out = {
    phiA: at(sol.phi.A),
    phiB: at(sol.phi.B),
    wA: at(sol.w.A),
    wB: at(sol.w.B),
  };
  let incompressibilityMax = 0;
  for (let j = 0; j < sol.nx; j++) incompressibilityMax = Math.max(incompressibilityMax, Math.abs(sol.phi.A[j] + sol.phi.B[j] - 1));
  const warnings: string[] = [];
  if (outside.length) {
    if (incompressibilityMax > EXTRAPOLATION_LIMITS.incompressibility) warnings.push(`φA + φB departs from 1 by up to ${formatNumber(incompressibilityMax, 2)} (limit ${EXTRAPOLATION_LIMITS.incompressibility})`);
    if (sol.residual > EXTRAPOLATION_LIMITS.residual) warnings.push(`the field residual is ${formatNumber(sol.residual, 2)} kT (limit ${EXTRAPOLATION_LIMITS.residual} kT): the fields are far from self-consistent`);
  }
  return {
    point: p,
    outside,
    incompressibilityMax,
    warnings,
    phase: sol.phase,
    period: L,
    Q: sol.Q,
    QDagger: sol.QDagger,
    freeEnergy: sol.freeEnergy,
    freeEnergyDisordered: sol.freeEnergyDisordered,
    residual: sol.residual,
    x: Array.from(x),
    t: Array.from(x, (v) => v / L),
    ...out,
    seconds: (performance.now() - t0) / 1000,
  };
}

/**
 * Gaussian Q resolution: the measured R at Q is the reflectivity averaged over a Gaussian in
 * Q centred at Q whose full width at half maximum is (dQ/Q)·Q, i.e. standard deviation
 * σ_Q = (dQ/Q)·Q / (2·sqrt(2 ln 2)). The instrument's dQ/Q is given as that FWHM (the usual
 * way instruments state it; common practice, no source).
 *
 * Units: Q in Å⁻¹. The average is a weighted sum over 2K + 1 equally spaced points across
 * ±3.5 σ_Q with Gaussian weights normalised to 1 (a truncated trapezoid rule; the tails beyond
 * 3.5σ hold 5e-4 of the weight). With dQ/Q = 0 the reflectivity is returned unsmeared.
 */

const FWHM_PER_SIGMA = 2 * Math.sqrt(2 * Math.LN2);
const HALF_POINTS = 10;
const SPAN_SIGMAS = 3.5;

/** R(Q) smeared by the resolution: `reflect` is called once with every Q it needs. */
export function smearedReflectivity(reflect: (q: Float64Array) => Float64Array, q: ArrayLike<number>, dQoverQ: number): Float64Array {
  if (!(dQoverQ > 0)) return reflect(Float64Array.from(q));
  const k = HALF_POINTS;
  const m = 2 * k + 1;
  const t = Float64Array.from({ length: m }, (_, i) => (SPAN_SIGMAS * (i - k)) / k);
  const w = t.map((v) => Math.exp(-0.5 * v * v));
  const wSum = w.reduce((a, b) => a + b, 0);
  const all = new Float64Array(q.length * m);
  for (let i = 0; i < q.length; i++) {
    const s = (dQoverQ * q[i]) / FWHM_PER_SIGMA;
    for (let j = 0; j < m; j++) all[i * m + j] = Math.abs(q[i] + s * t[j]);
  }
  const r = reflect(all);
  const out = new Float64Array(q.length);
  for (let i = 0; i < q.length; i++) {
    let s = 0;
    for (let j = 0; j < m; j++) s += w[j] * r[i * m + j];
    out[i] = s / wSum;
  }
  return out;
}

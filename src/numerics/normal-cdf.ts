/**
 * The standard normal cumulative distribution Φ(x) = ½[1 + erf(x/√2)], with erf by the
 * rational approximation of Abramowitz & Stegun 7.1.26 (absolute error ≤ 1.5e-7), which is
 * smooth in x, so finite differences through it stay clean.
 */
export function erf(x: number): number {
  const s = x < 0 ? -1 : 1;
  const a = Math.abs(x);
  const t = 1 / (1 + 0.3275911 * a);
  const y = 1 - ((((1.061405429 * t - 1.453152027) * t + 1.421413741) * t - 0.284496736) * t + 0.254829592) * t * Math.exp(-a * a);
  return s * y;
}

export function normalCdf(x: number): number {
  return 0.5 * (1 + erf(x / Math.SQRT2));
}

/**
 * The relative weights of a profile's points in the network estimators: 1/σ_i² over their mean
 * (unit weights without a sigma column), so the data rows' overall weight is set by the data
 * weight λ alone, not by the size of σ. Units: σ in φ units; the weights are dimensionless.
 */

/** The points' standard deviations: the sigma column, or ones without one. */
export function pointSigmas(sigma: Float64Array | undefined, n: number): Float64Array {
  return sigma ?? new Float64Array(n).fill(1);
}

/** mean_i 1/σ_i², the scale the weights are divided by. */
export function meanInverseVariance(sigma: Float64Array): number {
  let m = 0;
  for (const v of sigma) m += 1 / (v * v);
  return m / sigma.length;
}

/**
 * Is a fit with known sigma consistent with its data? With correct sigmas and model, χ² of
 * a least-squares fit is χ²-distributed with dof degrees of freedom: mean dof, standard
 * deviation sqrt(2 dof). A reduced χ² more than three of those standard deviations above 1
 * (χ²/dof > 1 + 3 sqrt(2/dof)) says the sigmas are too small or the model does not describe
 * the data, so its intervals are too narrow (common practice, no source).
 */
export function reducedChi2Limit(dof: number): number {
  return 1 + 3 * Math.sqrt(2 / Math.max(1, dof));
}

/** A warning sentence when the reduced χ² is far above 1, else undefined. */
export function reducedChi2Warning(reducedChi2: number, dof: number, what: string): string | undefined {
  const limit = reducedChi2Limit(dof);
  if (!(reducedChi2 > limit)) return undefined;
  return `reduced χ² = ${reducedChi2.toPrecision(4)} is far above 1 (above ${limit.toPrecision(3)} for ${dof} degrees of freedom): the given uncertainties are too small or the model does not describe ${what}; the intervals are then too narrow`;
}

/** The goodness of a weighted least-squares fit, as every fit of measured data reports it. */
export interface FitStatistics {
  /** χ² = Σ ((model_i − y_i)/σ_i)² at the best fit. */
  chi2: number;
  /** χ²/dof. */
  reducedChi2: number;
  /** Data points, fitted parameters, degrees of freedom n − p. */
  n: number;
  p: number;
  dof: number;
  /** σ from the data's column, or estimated from the residuals (value in the data's units). */
  sigma: { source: 'column' | 'estimated'; value: number | null };
}

/**
 * The Δχ² levels of the profile-likelihood intervals.
 *
 * Sigma known (a sigma column): for one parameter of interest, Δχ² = χ²(χN) − χ²_min is
 * asymptotically χ² with one degree of freedom, so the 68.27 % (one-sigma) interval is
 * Δχ² ≤ 1 and the 95 % interval Δχ² ≤ 3.841 (z² with z = 1.95996).
 *
 * Sigma estimated from the residuals, σ̂² = RSS_min/(n − p): the statistic ΔRSS/σ̂² is
 * F(1, n − p) distributed (the square of a Student t with n − p degrees of freedom), so the
 * level is t²_{n−p} at the same two-sided probability: slightly above z² for small n − p
 * (e.g. 1.016 and 3.996 at n − p = 62). Seber & Wild, Nonlinear Regression (1989), §5.9.
 */

export interface ConfidenceLevel {
  /** Label used as the key in the result JSON. */
  name: '68.3%' | '95%';
  /** Two-sided coverage probability. */
  probability: number;
  /** Normal quantile z at (1 + probability)/2. */
  z: number;
  /** (1 + probability)/2. */
  upper: number;
}

export const LEVELS: readonly ConfidenceLevel[] = [
  { name: '68.3%', probability: 0.6826894921370859, z: 1, upper: 0.8413447460685429 },
  { name: '95%', probability: 0.95, z: 1.959963984540054, upper: 0.975 },
];

/**
 * Student t quantile at probability `upper` (> 0.5) with nu degrees of freedom. Exact for
 * nu = 1, 2; otherwise the Cornish–Fisher expansion in the normal quantile z (Abramowitz &
 * Stegun 26.7.5), within 4e-3 at nu = 3 (3.1786 for 3.1824 at 97.5 %) and 2e-4 at nu = 5.
 */
export function studentT(upper: number, z: number, nu: number): number {
  if (!(nu >= 1)) throw new RangeError(`studentT: degrees of freedom must be ≥ 1, got ${nu}`);
  if (nu === 1) return Math.tan(Math.PI * (upper - 0.5));
  if (nu === 2) return (2 * upper - 1) / Math.sqrt(2 * upper * (1 - upper));
  const z2 = z * z;
  const g1 = (z * (z2 + 1)) / 4;
  const g2 = (z * ((5 * z2 + 16) * z2 + 3)) / 96;
  const g3 = (z * (((3 * z2 + 19) * z2 + 17) * z2 - 15)) / 384;
  const g4 = (z * ((((79 * z2 + 776) * z2 + 1482) * z2 - 1920) * z2 - 945)) / 92160;
  return z + g1 / nu + g2 / nu ** 2 + g3 / nu ** 3 + g4 / nu ** 4;
}

/** The Δχ² threshold of an interval: z² with sigma known, t²_{dof} with sigma estimated. */
export function deltaChi2Level(level: ConfidenceLevel, sigmaEstimated: boolean, dof: number): number {
  if (!sigmaEstimated) return level.z * level.z;
  const t = studentT(level.upper, level.z, dof);
  return t * t;
}

/** The Δχ² threshold of every level, by its name (what a result file records beside its intervals). */
export function deltaChi2Levels(sigmaEstimated: boolean, dof: number): Record<'68.3%' | '95%', number> {
  return Object.fromEntries(LEVELS.map((l) => [l.name, deltaChi2Level(l, sigmaEstimated, dof)])) as Record<'68.3%' | '95%', number>;
}

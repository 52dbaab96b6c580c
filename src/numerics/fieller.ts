/**
 * Confidence set of a ratio θ = μ₁/μ₂ of two jointly Gaussian estimates a₁, a₂ with
 * covariance (v₁₁, v₁₂, v₂₂), by Fieller's theorem (Fieller, J. R. Stat. Soc. B 16, 175
 * (1954)): the θ with (a₁ − θ a₂)² ≤ t² (v₁₁ − 2θ v₁₂ + θ² v₂₂), a quadratic inequality
 *   (a₂² − t² v₂₂) θ² − 2 (a₁ a₂ − t² v₁₂) θ + (a₁² − t² v₁₁) ≤ 0.
 * Bounded when the denominator is significant (a₂² > t² v₂₂); otherwise the set is the
 * whole line or the complement of an interval, and no finite interval exists.
 */
export type FiellerSet = { kind: 'interval'; lo: number; hi: number } | { kind: 'unbounded' };

export function fiellerInterval(a1: number, a2: number, v11: number, v22: number, v12: number, t: number): FiellerSet {
  const t2 = t * t;
  const A = a2 * a2 - t2 * v22;
  const B = -2 * (a1 * a2 - t2 * v12);
  const C = a1 * a1 - t2 * v11;
  if (!(A > 0)) return { kind: 'unbounded' };
  const disc = B * B - 4 * A * C;
  // With A > 0 the estimate a₁/a₂ itself satisfies the inequality, so disc ≥ 0 up to rounding.
  const r = Math.sqrt(Math.max(0, disc));
  const q1 = (-B - r) / (2 * A);
  const q2 = (-B + r) / (2 * A);
  return { kind: 'interval', lo: Math.min(q1, q2), hi: Math.max(q1, q2) };
}

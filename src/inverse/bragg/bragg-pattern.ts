/**
 * Bragg peaks of a lamellar stack from its composition profile.
 *
 * Units: lengths in Rg (q in 1/Rg); a caller with Rg in nm scales q by 1/Rg_nm. The period
 * is D = cell length / periods; order n sits at q_n = 2πn/D.
 *
 * Integrated intensity of order n: I_n ∝ |c_n|², c_n the Fourier coefficient of φ_A(x) at
 * q_n (the scattering contrast is (ρ_A − ρ_B)(φ_A − φ_B) = (ρ_A − ρ_B)(2φ_A − 1) in an
 * incompressible melt, so the same coefficients for n ≥ 1; the kinematic approximation,
 * common practice, no source). With the powder Lorentz factor (an isotropic powder of
 * lamellar grains) I_n is divided by q_n² (common practice, no source). Intensities are
 * reported relative to the first order.
 *
 * Checks against outside results (tests): at f = 1/2 the profile is symmetric about the
 * domain centres and antisymmetric about the interfaces, so even orders vanish; a sharp
 * interface gives I_n ∝ sin²(nπf)/n²; a smooth interface multiplies that by the square of
 * the Fourier transform of the interface profile's derivative.
 */
import type { FourierSeries } from '../../physics/cell/fourier-series.js';

export interface BraggPeak {
  order: number;
  /** q_n in 1/Rg. */
  q: number;
  /** |c_n|² (times 1/q² with the Lorentz factor), arbitrary units. */
  intensity: number;
  /** I_n / I_1. */
  relative: number;
}

export interface BraggPattern {
  /** The lamellar period D in Rg. */
  period: number;
  lorentz: boolean;
  peaks: BraggPeak[];
}

export function braggPeaks(phiA: FourierSeries, periods: number, orders: number, lorentz: boolean): BraggPattern {
  const D = phiA.period / periods;
  const peaks: BraggPeak[] = [];
  for (let n = 1; n <= orders; n++) {
    const q = (2 * Math.PI * n) / D;
    // mode() gives 2|c_m| for 0 < m < N/2; the cell's mode m = n·periods is order n.
    const a = phiA.mode(n * periods).amplitude / 2;
    peaks.push({ order: n, q, intensity: (a * a) / (lorentz ? q * q : 1), relative: 0 });
  }
  const first = peaks[0]?.intensity ?? 0;
  for (const p of peaks) p.relative = first > 0 ? p.intensity / first : Number.NaN;
  return { period: D, lorentz, peaks };
}

/** A drawn pattern: Gaussian peaks of standard deviation `width` (1/Rg) and area I_n/I_1, on `points` q values over [0, qMax]. */
export function patternCurve(p: BraggPattern, width: number, qMax: number, points = 2000): { q: number[]; I: number[] } {
  const q: number[] = [];
  const I: number[] = [];
  for (let k = 0; k < points; k++) {
    const qq = (qMax * k) / (points - 1);
    let s = 0;
    for (const pk of p.peaks) s += (pk.relative / (width * Math.sqrt(2 * Math.PI))) * Math.exp(-0.5 * ((qq - pk.q) / width) ** 2);
    q.push(qq);
    I.push(s);
  }
  return { q, I };
}

/**
 * The translation mode of a lamella in a periodic cell.
 *
 * Units: x and L in Rg; fields in kT per chain on the periodic grid x_j = jL/n.
 *
 * The SCFT equations are invariant under x → x + δ, so every lamellar solution comes with
 * a one-parameter family of shifted copies (a zero mode of the field iteration, like the
 * constant of the pressure field). A spectral iteration from a mirror-symmetric start keeps
 * its phase to round-off, but an approximate propagator solve (a network) breaks the mirror
 * symmetry slightly, and an iteration built on it then drifts along this mode: in a χN = 15
 * run the lamella wandered by 0.005 Rg, which alone made a φ_A error of 5e-3 against the
 * reference while the error after re-alignment was 1.4e-3. Pinning the phase of the
 * lamellar harmonic removes the drift, just as fixGauge removes the pressure constant
 * (common practice, no source).
 *
 * The phase is that of Fourier mode p of the exchange field w_A − w_B, where p is the
 * number of lamellar periods in the cell (mode p carries the lamella): for
 * u = a cos(k_p x − θ) + … the phase is θ, and u(x) → u(x + δ) changes it to θ − k_p δ,
 * k_p = 2πp/L.
 */
import { trigInterpolate } from './fields.js';
import type { SpeciesArrays } from './fields.js';

/** Amplitude and phase of mode p of a periodic grid function: u ≈ a cos(k_p x − θ) + … */
export function modePhase(u: ArrayLike<number>, p: number): { amplitude: number; phase: number } {
  const n = u.length;
  let c = 0;
  let s = 0;
  for (let j = 0; j < n; j++) {
    const a = (2 * Math.PI * p * j) / n;
    c += u[j] * Math.cos(a);
    s += u[j] * Math.sin(a);
  }
  return { amplitude: (2 * Math.hypot(c, s)) / n, phase: Math.atan2(s, c) };
}

/** Phase of the lamellar harmonic (mode `periods`) of w_A − w_B. */
export function lamellarPhase(w: SpeciesArrays, periods: number): { amplitude: number; phase: number } {
  return modePhase(
    Float64Array.from(w.A, (a, j) => a - w.B[j]),
    periods,
  );
}

/**
 * Shift the fields (in place, through their trigonometric interpolant) so the lamellar harmonic
 * has phase `phase` again. Returns the shift δ applied (Rg); a field with no lamellar
 * harmonic (amplitude below `minAmplitude` kT) is left alone.
 */
export function pinLamellarPhase(w: SpeciesArrays, length: number, periods: number, phase: number, minAmplitude = 1e-6): number {
  const now = lamellarPhase(w, periods);
  if (!(now.amplitude > minAmplitude)) return 0;
  let dphi = now.phase - phase;
  dphi -= 2 * Math.PI * Math.round(dphi / (2 * Math.PI));
  // u(x) → u(x + δ) moves the phase by −k_p δ.
  const delta = (dphi * length) / (2 * Math.PI * periods);
  if (delta === 0) return 0;
  const n = w.A.length;
  const x = Float64Array.from({ length: n }, (_, j) => (j * length) / n + delta);
  w.A.set(trigInterpolate(w.A, length, x));
  w.B.set(trigInterpolate(w.B, length, x));
  return delta;
}

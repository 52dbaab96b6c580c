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
import type { Cell } from './cell/cell.js';
import { FourierSeries } from './cell/fourier-series.js';
import type { SpeciesArrays } from './fields.js';

/** Amplitude and phase θ of mode p of a periodic grid function, read as u ≈ a cos(k_p x − θ) + … */
export function modePhase(u: ArrayLike<number>, p: number): { amplitude: number; phase: number } {
  const m = FourierSeries.fromGrid(u, 1).mode(p);
  return { amplitude: m.amplitude, phase: -m.phase };
}

/** Phase of the lamellar harmonic (mode `periods`) of w_A − w_B. */
export function lamellarPhase(w: SpeciesArrays, periods: number): { amplitude: number; phase: number } {
  return modePhase(
    Float64Array.from(w.A, (a, j) => a - w.B[j]),
    periods,
  );
}

/**
 * Shift the fields (in place, through the cell's translation) so the lamellar harmonic has
 * phase `phase` again. Returns the shift δ applied (Rg); a field with no lamellar harmonic
 * (amplitude below `minAmplitude` kT), or a cell without translation symmetry, is left alone.
 */
export function pinLamellarPhase(w: SpeciesArrays, cell: Cell, phase: number, minAmplitude = 1e-6): number {
  if (!cell.translation) return 0;
  const periods = cell.periods;
  const now = lamellarPhase(w, periods);
  if (!(now.amplitude > minAmplitude)) return 0;
  let dphi = now.phase - phase;
  dphi -= 2 * Math.PI * Math.round(dphi / (2 * Math.PI));
  // u(x) → u(x + δ) moves the phase by −k_p δ.
  const delta = (dphi * cell.length) / (2 * Math.PI * periods);
  if (delta === 0) return 0;
  w.A.set(cell.translation.shift(w.A, delta));
  w.B.set(cell.translation.shift(w.B, delta));
  return delta;
}

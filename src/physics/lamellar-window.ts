/**
 * What a lamellar verdict of a 1D cell means. A 1D cell compares lamellae with the disordered
 * melt only; in bulk mean-field theory cylinders, gyroid or spheres win outside a window of f
 * around 1/2. For a conformationally symmetric linear AB diblock (b_A = b_B) that window is
 * taken from the mean-field phase diagram of Matsen & Bates, Macromolecules 29, 1091 (1996):
 * the lamellar/gyroid (and, above χN ≈ 60, lamellar/cylinder) boundary f_L(χN) below, with
 * 1 − f_L on the other side. The values are approximate readings of that diagram from memory
 * (±0.02 in f), so the note says "about"; the mean-field order–disorder point is χN = 10.495
 * at f = 1/2 (Leibler 1980). Other chains (triblocks, b_A ≠ b_B, general blocks) get the
 * "compared with disorder only" wording without a window.
 */
import type { ChainSpec } from './chain-schema.js';
import type { Phase } from './result.js';

/** (χN, lower boundary f_L of the lamellar window), approximate, from memory of Matsen & Bates 1996. */
export const LAMELLAR_WINDOW: readonly (readonly [number, number])[] = [
  [11, 0.47],
  [12, 0.44],
  [15, 0.4],
  [20, 0.37],
  [30, 0.35],
  [40, 0.34],
  [60, 0.33],
  [100, 0.32],
];

export const PHASE_DIAGRAM_SOURCE = 'mean-field phase diagram of Matsen & Bates, Macromolecules 29, 1091 (1996); boundaries approximate';

/** The lower end f_L of the bulk lamellar window at χN (linear interpolation; null below the first row). */
export function lamellarWindowLower(chiN: number): number | null {
  const t = LAMELLAR_WINDOW;
  if (chiN < t[0][0]) return null;
  if (chiN >= t[t.length - 1][0]) return t[t.length - 1][1];
  let i = 0;
  while (t[i + 1][0] <= chiN) i++;
  const [c0, f0] = t[i];
  const [c1, f1] = t[i + 1];
  return f0 + ((f1 - f0) * (chiN - c0)) / (c1 - c0);
}

/** The phase as a reader should take it: lamellae are compared with disorder only. */
export function phaseLabel(phase: Phase): string {
  return phase === 'lamellar' ? 'lamellar (compared with disorder only)' : phase;
}

/** A note when a lamellar verdict lies outside the bulk lamellar window; undefined inside it or when no window applies. */
export function bulkPhaseNote(phase: Phase, chain: ChainSpec, chiN: number): string | undefined {
  if (phase !== 'lamellar' || chain.type !== 'diblock' || chain.segmentRatio !== 1) return undefined;
  const lo = lamellarWindowLower(chiN);
  const f = chain.f;
  const fmt = (v: number) => Number(v.toPrecision(2)).toString();
  if (lo === null) {
    if (Math.abs(f - 0.5) <= 0.03) return undefined;
    return `at χN = ${Number(chiN.toPrecision(6))} bulk mean-field lamellae are stable only very near f = 0.5 (${PHASE_DIAGRAM_SOURCE}): compare with the disordered melt only`;
  }
  if (f >= lo && f <= 1 - lo) return undefined;
  return `f = ${Number(f.toPrecision(6))} is outside about ${fmt(lo)}–${fmt(1 - lo)}, where lamellae are the bulk phase at χN = ${Number(chiN.toPrecision(6))} (${PHASE_DIAGRAM_SOURCE}): in bulk, cylinders, gyroid or spheres are expected; this 1D cell compared lamellae with the disordered melt only`;
}

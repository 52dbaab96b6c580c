/** Number formatting for report text and tables (fixed significant digits: stable output). */

import { formatNumber } from '../io/number-format.js';

/** The tool's one number format (io/number-format.ts); NaN reads "n/a" in a report. */
export function sig(v: number | undefined | null, digits = 6): string {
  if (typeof v === 'number' && Number.isNaN(v)) return 'n/a';
  return formatNumber(v, digits);
}

export function sci(v: number | undefined | null, digits = 2): string {
  if (v === undefined || v === null || !Number.isFinite(v)) return 'n/a';
  return v.toExponential(digits);
}

/** A wall time for people: "0.53 s", "44.6 s", "3 min 05 s". */
export function duration(seconds: number | undefined): string {
  if (seconds === undefined || !Number.isFinite(seconds)) return 'not recorded';
  if (seconds < 60) return `${Number(seconds.toPrecision(3))} s`;
  const m = Math.floor(seconds / 60);
  const s = Math.round(seconds - 60 * m);
  return `${m} min ${String(s).padStart(2, '0')} s`;
}


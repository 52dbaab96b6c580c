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

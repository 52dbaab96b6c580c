/** Number formatting for report text and tables (fixed significant digits: stable output). */

export function sig(v: number | undefined | null, digits = 6): string {
  if (v === undefined || v === null) return 'n/a';
  if (!Number.isFinite(v)) return Number.isNaN(v) ? 'n/a' : String(v);
  if (v === 0) return '0';
  const a = Math.abs(v);
  if (a < 1e-3 || a >= 1e6) return v.toExponential(digits - 1);
  return Number(v.toPrecision(digits)).toString();
}

export function sci(v: number | undefined | null, digits = 2): string {
  if (v === undefined || v === null || !Number.isFinite(v)) return 'n/a';
  return v.toExponential(digits);
}

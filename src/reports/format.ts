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

/** A wall time for people: "0.53 s", "44.6 s", "3 min 05 s". */
export function duration(seconds: number | undefined): string {
  if (seconds === undefined || !Number.isFinite(seconds)) return 'not recorded';
  if (seconds < 60) return `${Number(seconds.toPrecision(3))} s`;
  const m = Math.floor(seconds / 60);
  const s = Math.round(seconds - 60 * m);
  return `${m} min ${String(s).padStart(2, '0')} s`;
}


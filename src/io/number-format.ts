/**
 * The one number format of every message, summary line and report table: a fixed number of
 * significant digits with float noise removed (0.6699999999999999 → 0.67,
 * 4.619999999999999 → 4.62), and exponent form only for very small or large magnitudes.
 */

/** `v` to `digits` significant digits (default 6), trailing zeros dropped; "n/a" for a missing value. */
export function formatNumber(v: number | undefined | null, digits = 6): string {
  if (v === undefined || v === null) return 'n/a';
  if (!Number.isFinite(v)) return String(v);
  if (v === 0) return '0';
  const a = Math.abs(v);
  if (a < 1e-4 || a >= 1e6) {
    const [mantissa, exponent] = v.toExponential(digits - 1).split('e');
    const trimmed = mantissa.includes('.') ? mantissa.replace(/0+$/, '').replace(/\.$/, '') : mantissa;
    return `${trimmed}e${exponent}`;
  }
  return Number(v.toPrecision(digits)).toString();
}

/** Any JSON-like value with its numbers formatted (lists and objects as compact JSON-like text). */
export function formatValue(v: unknown, digits = 6): string {
  if (typeof v === 'number') return formatNumber(v, digits);
  if (Array.isArray(v)) return `[${v.map((x) => formatValue(x, digits)).join(', ')}]`;
  if (v !== null && typeof v === 'object') return `{${Object.entries(v).map(([k, x]) => `${k}: ${formatValue(x, digits)}`).join(', ')}}`;
  return JSON.stringify(v) ?? String(v);
}

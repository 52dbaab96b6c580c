/**
 * A decimal number as people type it, read strictly: no hex/octal/binary forms, no "Infinity",
 * no blanks. Its own small module because the quick answers (quick-answer.ts) read flags with it
 * before the command-line parser and the error machinery load.
 */
const DECIMAL = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

/**
 * Parse a decimal number as a user typed it, or say what is wrong with it. Strings that
 * JavaScript would quietly turn into something else (0x10 → 16, "" → 0, 1e999 → Infinity,
 * 1e-400 → 0) are refused. Returns the message for `name`, or the value.
 */
export function parseDecimal(name: string, value: string): number | string {
  const t = value.trim();
  if (t === '') return `${name}: got ${JSON.stringify(value)} (empty); allowed: a number`;
  if (!DECIMAL.test(t)) return `${name}: got ${JSON.stringify(value)}; allowed: a number in decimal notation (e.g. 15, 0.5, 1e-6)`;
  const v = Number(t);
  if (!Number.isFinite(v)) return `${name}: got ${value}, which is beyond the range of a double (got Infinity); allowed: a finite number`;
  if (v === 0 && /[1-9]/.test(t.replace(/[eE].*$/, ''))) return `${name}: got ${value}, which is too small to represent (it underflows to 0); allowed: a number ≥ 1e-300 in size, or 0`;
  return v;
}

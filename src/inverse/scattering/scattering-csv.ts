/**
 * The measured-scattering input: a CSV of q, I(q) and an optional per-point standard
 * deviation dI, with a header row that names the unit of q, read by io/column-csv.ts (so every
 * error names the file, line and column).
 *
 * Columns (any order, case-insensitive): `q_per_nm` (q in nm⁻¹) or `q_per_A` (q in Å⁻¹,
 * converted to nm⁻¹ by × 10), `I`, optionally `dI`. Blank lines and lines starting with #
 * are skipped; CRLF line ends and a UTF-8 byte-order mark are accepted. q > 0, increasing.
 */
import { Q_WITH_UNIT, Q_WITH_UNIT_HINTS, parseColumnCsv, requireEach } from '../../io/column-csv.js';

export type QUnit = 'per_nm' | 'per_A';

export interface ScatteringData {
  source: string;
  /** q in nm⁻¹, strictly increasing. */
  q: Float64Array;
  /** q as written in the file. */
  qRaw: Float64Array;
  qUnit: QUnit;
  /** Factor from the file's q unit to nm⁻¹ (1 or 10). */
  toPerNm: number;
  intensity: Float64Array;
  /** Per-point standard deviation of I, when the file has a dI column. */
  sigma?: Float64Array;
  /** File line (1-based) of each point. */
  lines: number[];
}

export function qUnitLabel(u: QUnit): string {
  return u === 'per_nm' ? 'nm⁻¹' : 'Å⁻¹';
}

export function parseScatteringCsv(text: string, source: string): ScatteringData {
  const d = parseColumnCsv(text, source, ['I'], ['dI'], { choices: [Q_WITH_UNIT], increasing: 'q', hints: Q_WITH_UNIT_HINTS });
  const qUnit: QUnit = d.columns.q_per_nm ? 'per_nm' : 'per_A';
  const qName = `q_${qUnit}`;
  requireEach(d, qName, (v) => v > 0, 'q > 0');
  requireEach(d, 'dI', (v) => v > 0, 'a standard deviation > 0');
  const toPerNm = qUnit === 'per_A' ? 10 : 1;
  const qRaw = d.columns[qName];
  return { source, q: qRaw.map((v) => v * toPerNm), qRaw, qUnit, toPerNm, intensity: d.columns.I, sigma: d.columns.dI, lines: d.lines };
}

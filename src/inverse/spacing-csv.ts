/**
 * The domain-spacing CSV: columns N, D_nm and optionally dD_nm (any order, header row), one
 * row per chain length, read by io/column-csv.ts so every error names the file, line and
 * column. N is the number of reference segments, D and dD in nm; all values > 0.
 */
import { parseColumnCsv, requireEach } from '../io/column-csv.js';
import type { SpacingData } from './spacing-series.js';

export function parseSpacingCsv(text: string, source: string): SpacingData {
  const d = parseColumnCsv(text, source, ['N', 'D_nm'], ['dD_nm'], { increasing: null });
  for (const name of ['N', 'D_nm', 'dD_nm']) requireEach(d, name, (v) => v > 0, 'a number > 0');
  return { source, N: Array.from(d.columns.N), D: Array.from(d.columns.D_nm), dD: d.columns.dD_nm ? Array.from(d.columns.dD_nm) : undefined };
}

/**
 * The measured-scattering input: a CSV of q, I(q) and an optional per-point standard
 * deviation dI, with a header row that names the unit of q. Hand-parsed (not zod) so every
 * error names the file, line and column.
 *
 * Columns (any order, case-insensitive): `q_per_nm` (q in nm⁻¹) or `q_per_A` (q in Å⁻¹,
 * converted to nm⁻¹ by × 10), `I`, optionally `dI`. Blank lines and lines starting with #
 * are skipped; CRLF line ends and a UTF-8 byte-order mark are accepted.
 */
import { InputError } from '../../io/errors.js';

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

const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
const ALLOWED = 'q_per_nm or q_per_A (q with its unit), I, and optionally dI';

export function qUnitLabel(u: QUnit): string {
  return u === 'per_nm' ? 'nm⁻¹' : 'Å⁻¹';
}

export function parseScatteringCsv(text: string, source: string): ScatteringData {
  const rows = text.replace(/^\uFEFF/, '').split(/\r?\n/);
  let header: string[] | undefined;
  let headerLine = 0;
  let qUnit: QUnit = 'per_nm';
  const q: number[] = [];
  const I: number[] = [];
  const dI: number[] = [];
  const lines: number[] = [];
  for (let r = 0; r < rows.length; r++) {
    const lineNo = r + 1;
    const raw = rows[r].trim();
    if (raw === '' || raw.startsWith('#')) continue;
    const cells = raw.split(',').map((c) => c.trim().replace(/^"|"$/g, ''));
    if (!header) {
      headerLine = lineNo;
      header = cells.map((c) => c.toLowerCase());
      header.forEach((h, i) => {
        if (!['q_per_nm', 'q_per_a', 'i', 'di'].includes(h)) {
          const hint = h === 'q' ? '; name the unit of q in the header: q_per_nm or q_per_A' : NUMBER.test(h) ? '; the first line must be a header row' : '';
          throw new InputError(`${source}: line ${lineNo}, column ${i + 1}: unknown column ${JSON.stringify(cells[i])}${hint}; allowed columns: ${ALLOWED}`);
        }
        if (header!.indexOf(h) !== i) throw new InputError(`${source}: line ${lineNo}, column ${i + 1}: column ${JSON.stringify(cells[i])} named twice`);
      });
      const hasNm = header.includes('q_per_nm');
      const hasA = header.includes('q_per_a');
      if (hasNm && hasA) throw new InputError(`${source}: line ${lineNo}: both q_per_nm and q_per_A columns; give one q column`);
      if (!hasNm && !hasA) throw new InputError(`${source}: line ${lineNo}: the header has no q column; allowed columns: ${ALLOWED}`);
      if (!header.includes('i')) throw new InputError(`${source}: line ${lineNo}: the header has no I column; allowed columns: ${ALLOWED}`);
      qUnit = hasNm ? 'per_nm' : 'per_A';
      continue;
    }
    if (cells.length !== header.length) {
      throw new InputError(`${source}: line ${lineNo}: ${cells.length} values, but the header on line ${headerLine} names ${header.length} columns (${header.join(', ')})`);
    }
    const v: Record<string, number> = {};
    cells.forEach((c, i) => {
      const name = header![i];
      if (!NUMBER.test(c) || !Number.isFinite(Number(c))) throw new InputError(`${source}: line ${lineNo}, column ${i + 1} (${name}): got ${JSON.stringify(c)}; allowed: a finite number`);
      v[name] = Number(c);
    });
    const qv = v.q_per_nm ?? v.q_per_a;
    const qCol = header.findIndex((h) => h.startsWith('q_')) + 1;
    if (!(qv > 0)) throw new InputError(`${source}: line ${lineNo}, column ${qCol} (q): got ${qv}; allowed: q > 0`);
    if (q.length > 0 && !(qv > q[q.length - 1])) {
      throw new InputError(`${source}: line ${lineNo}, column ${qCol} (q): got ${qv} after ${q[q.length - 1]} on line ${lines[lines.length - 1]}; q must increase strictly (sort the rows by q)`);
    }
    if (v.di !== undefined && !(v.di > 0)) throw new InputError(`${source}: line ${lineNo}, column ${header.indexOf('di') + 1} (dI): got ${v.di}; allowed: a standard deviation > 0`);
    q.push(qv);
    I.push(v.i);
    if (v.di !== undefined) dI.push(v.di);
    lines.push(lineNo);
  }
  if (!header) throw new InputError(`${source}: the file is empty; expected a header row (q_per_nm,I[,dI]) and data rows`);
  if (q.length === 0) throw new InputError(`${source}: no data rows after the header on line ${headerLine}`);
  const toPerNm = qUnit === 'per_A' ? 10 : 1;
  const qRaw = Float64Array.from(q);
  return {
    source,
    q: qRaw.map((v) => v * toPerNm),
    qRaw,
    qUnit,
    toPerNm,
    intensity: Float64Array.from(I),
    sigma: header.includes('di') ? Float64Array.from(dI) : undefined,
    lines,
  };
}

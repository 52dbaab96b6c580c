/**
 * The measured-profile input: a CSV of x, phiA and an optional per-point sigma, with a
 * header row. Hand-parsed (not zod) so every error names the file, line and column.
 *
 * Accepted: columns in any order, named x (or x_nm, x_Rg: x with its unit), phiA, sigma
 * (case-insensitive); blank lines and
 * lines starting with # are skipped; CRLF line ends; a UTF-8 byte-order mark. Positions in
 * Rg, or in nm when an Rg in nm is given (then every length is divided by it).
 */
import { InputError } from '../io/errors.js';

export interface LengthUnits {
  /** Units of x (and of every length given with it) as read. */
  x: 'Rg' | 'nm';
  /** Rg in nm, when x is in nm. */
  rgNm?: number;
  /** How rgNm was obtained. */
  rgFrom?: string;
}

export interface ProfileData {
  source: string;
  /** Positions in Rg, strictly increasing. */
  x: Float64Array;
  /** Positions as written in the file (Rg or nm). */
  xRaw: Float64Array;
  phi: Float64Array;
  /** Per-point standard deviation, when the file has a sigma column. */
  sigma?: Float64Array;
  /** File line (1-based) of each point. */
  lines: number[];
  units: LengthUnits;
}

const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
const COLUMNS = ['x', 'phia', 'sigma'] as const;
type Column = (typeof COLUMNS)[number];
const DISPLAY: Record<Column, string> = { x: 'x', phia: 'phiA', sigma: 'sigma' };
/** Header names of x that carry their unit: x_nm is in nm, x_rg in Rg. */
const X_WITH_UNIT: Record<string, 'nm' | 'Rg'> = { x_nm: 'nm', x_rg: 'Rg' };

/** Rg in nm from the flags: --rg-nm, or --segments N with --segment-length-nm b (Rg = b·sqrt(N/6)). */
export function lengthUnits(opts: { rgNm?: number; segments?: number; segmentLengthNm?: number }): LengthUnits {
  const { rgNm, segments, segmentLengthNm } = opts;
  if (rgNm !== undefined && (segments !== undefined || segmentLengthNm !== undefined)) {
    throw new InputError('--rg-nm: give either --rg-nm or --segments with --segment-length-nm, not both');
  }
  if (rgNm !== undefined) {
    if (!(rgNm > 0) || !Number.isFinite(rgNm)) throw new InputError(`--rg-nm: got ${rgNm}; allowed: Rg in nm, a number > 0`);
    return { x: 'nm', rgNm, rgFrom: '--rg-nm' };
  }
  if (segments !== undefined || segmentLengthNm !== undefined) {
    if (segments === undefined) throw new InputError('--segments: missing; --segment-length-nm needs --segments N as well (Rg = b·sqrt(N/6))');
    if (segmentLengthNm === undefined) throw new InputError('--segment-length-nm: missing; --segments needs --segment-length-nm b as well (Rg = b·sqrt(N/6))');
    if (!(segments > 0) || !Number.isFinite(segments)) throw new InputError(`--segments: got ${segments}; allowed: the number of segments N, a number > 0`);
    if (!(segmentLengthNm > 0) || !Number.isFinite(segmentLengthNm)) throw new InputError(`--segment-length-nm: got ${segmentLengthNm}; allowed: the segment length b in nm, a number > 0`);
    return { x: 'nm', rgNm: segmentLengthNm * Math.sqrt(segments / 6), rgFrom: `--segments ${segments} --segment-length-nm ${segmentLengthNm} (Rg = b·sqrt(N/6))` };
  }
  return { x: 'Rg' };
}

function at(source: string, line: number, col: number, name: string): string {
  return `${source}: line ${line}, column ${col} (${name})`;
}

/**
 * A rough noise level of φ from second differences (for the [0, 1] check when there is no
 * sigma column): white noise of variance σ² gives second differences of variance 6σ²; the
 * median absolute deviation makes it robust to the interfaces (common practice, no source).
 */
function roughNoise(phi: Float64Array): number {
  if (phi.length < 5) return 0;
  const d: number[] = [];
  for (let i = 1; i + 1 < phi.length; i++) d.push(Math.abs(phi[i + 1] - 2 * phi[i] + phi[i - 1]));
  d.sort((a, b) => a - b);
  return (1.4826 * d[Math.floor(d.length / 2)]) / Math.sqrt(6);
}

/** How far outside [0, 1] a value may lie: five standard deviations of its noise. */
export const RANGE_SIGMAS = 5;
/** Without a sigma column the allowance is never below this (rounding in measured data). */
export const RANGE_FLOOR = 0.02;

export function parseProfileCsv(text: string, source: string, units: LengthUnits = { x: 'Rg' }): ProfileData {
  const rows = text.replace(/^\uFEFF/, '').split(/\r?\n/);
  let headerLine = -1;
  let header: Column[] = [];
  let headerUnit: 'nm' | 'Rg' | undefined;
  const xs: number[] = [];
  const phis: number[] = [];
  const sigmas: number[] = [];
  const lines: number[] = [];
  for (let r = 0; r < rows.length; r++) {
    const lineNo = r + 1;
    const raw = rows[r].trim();
    if (raw === '' || raw.startsWith('#')) continue;
    const cells = raw.split(',').map((c) => c.trim());
    if (headerLine < 0) {
      headerLine = lineNo;
      const seen = new Set<Column>();
      cells.forEach((c, i) => {
        let name = c.replace(/^"|"$/g, '').toLowerCase() as Column;
        if (X_WITH_UNIT[name] !== undefined) {
          headerUnit = X_WITH_UNIT[name];
          name = 'x';
        }
        if (!COLUMNS.includes(name)) {
          const looksNumeric = NUMBER.test(c);
          throw new InputError(
            `${at(source, lineNo, i + 1, JSON.stringify(c))}: ${looksNumeric ? 'the first line must be a header row' : 'unknown column'}; allowed columns: x, phiA, and optionally sigma (a header row naming them is required; x_nm or x_Rg name x with its unit)`,
          );
        }
        if (seen.has(name)) throw new InputError(`${at(source, lineNo, i + 1, DISPLAY[name])}: column named twice in the header`);
        seen.add(name);
        header.push(name);
      });
      for (const need of ['x', 'phia'] as const) {
        if (!seen.has(need)) throw new InputError(`${source}: line ${lineNo}: the header has no ${DISPLAY[need]} column; allowed columns: x, phiA, and optionally sigma (x_nm or x_Rg name x with its unit)`);
      }
      if (headerUnit === 'nm' && units.x !== 'nm') {
        throw new InputError(`${source}: line ${lineNo}: the header says x is in nm (x_nm), but no Rg in nm was given; give --rg-nm R (or --segments N --segment-length-nm b) so x can be read in Rg`);
      }
      if (headerUnit === 'Rg' && units.x === 'nm') {
        throw new InputError(`${source}: line ${lineNo}: the header says x is in Rg (x_Rg), but ${units.rgFrom} says x is in nm; drop the nm flags or give x in nm`);
      }
      continue;
    }
    if (cells.length !== header.length) {
      const col = Math.min(cells.length, header.length) + 1;
      const name = cells.length < header.length ? DISPLAY[header[cells.length]] : `extra value ${JSON.stringify(cells[header.length])}`;
      throw new InputError(
        `${at(source, lineNo, col, name)}: ${cells.length < header.length ? 'missing value' : 'more values than header columns'}; every row needs ${header.length} comma-separated values (${header.map((h) => DISPLAY[h]).join(', ')})`,
      );
    }
    const values: Partial<Record<Column, number>> = {};
    cells.forEach((c, i) => {
      const name = header[i];
      if (c === '') throw new InputError(`${at(source, lineNo, i + 1, DISPLAY[name])}: missing value; allowed: a finite number`);
      if (!NUMBER.test(c)) throw new InputError(`${at(source, lineNo, i + 1, DISPLAY[name])}: got ${JSON.stringify(c)}; allowed: a finite number`);
      const v = Number(c);
      if (!Number.isFinite(v)) throw new InputError(`${at(source, lineNo, i + 1, DISPLAY[name])}: got ${JSON.stringify(c)}; allowed: a finite number`);
      if (name === 'sigma' && !(v > 0)) throw new InputError(`${at(source, lineNo, i + 1, 'sigma')}: got ${c}; allowed: a standard deviation > 0`);
      values[name] = v;
    });
    const xCol = header.indexOf('x') + 1;
    if (xs.length > 0) {
      const prev = xs[xs.length - 1];
      const prevLine = lines[lines.length - 1];
      if (values.x! === prev) throw new InputError(`${at(source, lineNo, xCol, 'x')}: got ${cells[xCol - 1]}, the same x as line ${prevLine}; x must increase strictly (merge or remove repeated positions)`);
      if (values.x! < prev) throw new InputError(`${at(source, lineNo, xCol, 'x')}: got ${cells[xCol - 1]} after ${prev} on line ${prevLine}; x must increase strictly (sort the rows by x)`);
    }
    xs.push(values.x!);
    phis.push(values.phia!);
    if (values.sigma !== undefined) sigmas.push(values.sigma);
    lines.push(lineNo);
  }
  if (headerLine < 0) throw new InputError(`${source}: the file is empty; expected a header row (x,phiA[,sigma]) and data rows`);
  if (xs.length === 0) throw new InputError(`${source}: no data rows after the header on line ${headerLine}`);
  const phi = Float64Array.from(phis);
  const sigma = header.includes('sigma') ? Float64Array.from(sigmas) : undefined;
  const phiCol = header.indexOf('phia') + 1;
  const rough = sigma ? 0 : roughNoise(phi);
  for (let i = 0; i < phi.length; i++) {
    const allow = sigma ? RANGE_SIGMAS * sigma[i] : Math.max(RANGE_FLOOR, RANGE_SIGMAS * rough);
    const v = phi[i];
    if (v < -allow || v > 1 + allow) {
      const basis = sigma ? `${RANGE_SIGMAS} × its sigma ${sigma[i]}` : `${allow.toPrecision(3)} (${RANGE_SIGMAS} × the noise level ${rough.toPrecision(3)} estimated from the data, at least ${RANGE_FLOOR}; no sigma column)`;
      throw new InputError(
        `${at(source, lines[i], phiCol, 'phiA')}: got ${v}; a volume fraction lies in [0, 1], and this is outside it by more than ${basis}. Check that the column is the A fraction, not a percentage or a raw signal`,
      );
    }
  }
  const xRaw = Float64Array.from(xs);
  const scale = units.x === 'nm' ? 1 / units.rgNm! : 1;
  return { source, x: xRaw.map((v) => v * scale), xRaw, phi, sigma, lines, units };
}

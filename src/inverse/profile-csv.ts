/**
 * The measured-profile input: a CSV of x, phiA and an optional per-point sigma, with a
 * header row, read by the one column reader (io/column-csv.ts: every error names the file,
 * line and column; blank and # lines skipped; CRLF; a byte-order mark).
 *
 * Columns in any order, named x (or x_nm, x_Rg: x with its unit), phiA, sigma
 * (case-insensitive). Positions in Rg, or in nm when an Rg in nm is given (then every length
 * is divided by it).
 */
import { InputError } from '../io/errors.js';
import { cellPlace, parseColumnCsv, requireEach } from '../io/column-csv.js';
import type { ColumnChoice } from '../io/column-csv.js';

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

/** x under the name that gives its unit: bare x follows the flags (Rg, or nm with an Rg in nm). */
const X_COLUMN: ColumnChoice = { label: 'x', names: ['x', 'x_nm', 'x_Rg'] };

export function parseProfileCsv(text: string, source: string, units: LengthUnits = { x: 'Rg' }): ProfileData {
  const d = parseColumnCsv(text, source, ['phiA'], ['sigma'], { choices: [X_COLUMN], increasing: 'x' });
  const xName = X_COLUMN.names.find((n) => d.header.includes(n))!;
  if (xName === 'x_nm' && units.x !== 'nm') {
    throw new InputError(`${source}: line ${d.headerLine}: the header says x is in nm (x_nm), but no Rg in nm was given; give --rg-nm R (or --segments N --segment-length-nm b) so x can be read in Rg`);
  }
  if (xName === 'x_Rg' && units.x === 'nm') {
    throw new InputError(`${source}: line ${d.headerLine}: the header says x is in Rg (x_Rg), but ${units.rgFrom} says x is in nm; drop the nm flags or give x in nm`);
  }
  requireEach(d, 'sigma', (v) => v > 0, 'a standard deviation > 0');
  const lines = d.lines;
  const phi = d.columns.phiA;
  const sigma = d.columns.sigma;
  const rough = sigma ? 0 : roughNoise(phi);
  for (let i = 0; i < phi.length; i++) {
    const allow = sigma ? RANGE_SIGMAS * sigma[i] : Math.max(RANGE_FLOOR, RANGE_SIGMAS * rough);
    const v = phi[i];
    if (v < -allow || v > 1 + allow) {
      const basis = sigma ? `${RANGE_SIGMAS} × its sigma ${sigma[i]}` : `${allow.toPrecision(3)} (${RANGE_SIGMAS} × the noise level ${rough.toPrecision(3)} estimated from the data, at least ${RANGE_FLOOR}; no sigma column)`;
      throw new InputError(
        `${cellPlace(d, i, 'phiA')}: got ${v}; a volume fraction lies in [0, 1], and this is outside it by more than ${basis}. Check that the column is the A fraction, not a percentage or a raw signal`,
      );
    }
  }
  const xRaw = d.columns[xName];
  const scale = units.x === 'nm' ? 1 / units.rgNm! : 1;
  return { source, x: xRaw.map((v) => v * scale), xRaw, phi, sigma, lines, units };
}

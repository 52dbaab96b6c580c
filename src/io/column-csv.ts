/**
 * A numeric CSV with a header row naming its columns (case-insensitive), for every measured
 * data file: composition profiles (through inverse/profile-csv.ts), SLD depth profiles
 * (x, sld[, sigma]), reflectivity curves (Q, R, dR), scattering curves (q with its unit, I,
 * dI), Bragg peaks (order, q with its unit, I, dI, dq) and domain spacings (N, D_nm, dD_nm).
 * Hand-parsed so that every error names the file, the line and the column. Blank lines and
 * lines starting with # are skipped; CRLF line ends and a UTF-8 byte-order mark are accepted.
 * One column (the first required one unless the caller says otherwise) must increase strictly.
 */
import { InputError } from './errors.js';

const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

export interface ColumnData {
  source: string;
  /** Columns by their name as the caller asked for it. */
  columns: Record<string, Float64Array>;
  /** The columns present, in the file's order (names as the caller asked for them). */
  header: string[];
  /** File line (1-based) of each data row. */
  lines: number[];
  /** File line (1-based) of the header row. */
  headerLine: number;
}

/** A column that can be written under one of several names (q with its unit): exactly one must appear. */
export interface ColumnChoice {
  /** What the column is, in messages ("q"). */
  label: string;
  names: string[];
}

export interface ColumnOptions {
  /** Columns of which exactly one name must appear, besides the required ones. */
  choices?: ColumnChoice[];
  /** The column (a name, or a choice's label) that must increase strictly; null for none. Default: the first required column. */
  increasing?: string | null;
  /** What to add to the message when the header has this unknown name (lower case). */
  hints?: Record<string, string>;
}

/** The q column of scattering data, under the name that gives its unit (nm⁻¹ or Å⁻¹); a bare "q" gets a hint. */
export const Q_WITH_UNIT: ColumnChoice = { label: 'q', names: ['q_per_nm', 'q_per_A'] };
export const Q_WITH_UNIT_HINTS = { q: 'name the unit of q in the header: q_per_nm or q_per_A' };

export function parseColumnCsv(text: string, source: string, required: string[], optional: string[] = [], o: ColumnOptions = {}): ColumnData {
  const choices = o.choices ?? [];
  const all = [...required, ...choices.flatMap((c) => c.names), ...optional];
  const allowed = [...choices.map((c) => c.names.join(' or ')), ...required].join(', ') + (optional.length ? `, and optionally ${optional.join(', ')}` : '');
  const rows = text.replace(/^\uFEFF/, '').split(/\r?\n/);
  let header: string[] | undefined;
  let headerLine = 0;
  let inc = -1;
  let incLabel = '';
  const values: number[][] = [];
  const lines: number[] = [];
  for (let r = 0; r < rows.length; r++) {
    const line = r + 1;
    const raw = rows[r].trim();
    if (raw === '' || raw.startsWith('#')) continue;
    const cells = raw.split(',').map((c) => c.trim());
    if (!header) {
      headerLine = line;
      header = [];
      for (let i = 0; i < cells.length; i++) {
        const c = cells[i];
        const bare = c.replace(/^"|"$/g, '');
        const name = all.find((a) => a.toLowerCase() === bare.toLowerCase());
        if (!name) {
          const hint = NUMBER.test(c) ? 'the first line must be a header row' : `unknown column${o.hints?.[bare.toLowerCase()] ? `; ${o.hints[bare.toLowerCase()]}` : ''}`;
          throw new InputError(`${source}: line ${line}, column ${i + 1} (${JSON.stringify(c)}): ${hint}; allowed columns: ${allowed}`);
        }
        if (header.includes(name)) throw new InputError(`${source}: line ${line}, column ${i + 1} (${name}): column named twice in the header`);
        header.push(name);
      }
      for (const need of required) if (!header.includes(need)) throw new InputError(`${source}: line ${line}: the header has no ${need} column; allowed columns: ${allowed}`);
      for (const c of choices) {
        const present = c.names.filter((n) => header!.includes(n));
        if (present.length === 0) throw new InputError(`${source}: line ${line}: the header has no ${c.label} column; allowed columns: ${allowed}`);
        if (present.length > 1) throw new InputError(`${source}: line ${line}: both ${present.join(' and ')} columns; give one ${c.label} column`);
      }
      const wanted = o.increasing === undefined ? required[0] : o.increasing;
      if (wanted !== null) {
        const choice = choices.find((c) => c.label === wanted);
        inc = header.indexOf(choice?.names.find((n) => header!.includes(n)) ?? wanted);
        incLabel = choice?.label ?? wanted;
      }
      continue;
    }
    if (cells.length > header.length) {
      throw new InputError(`${source}: line ${line}, column ${header.length + 1} (extra value ${JSON.stringify(cells[header.length])}): ${cells.length} values, but the header on line ${headerLine} names ${header.length} columns (${header.join(', ')})`);
    }
    if (cells.length < header.length) {
      throw new InputError(`${source}: line ${line}, column ${cells.length + 1} (${header[cells.length]}): missing value; every row needs ${header.length} comma-separated values (${header.join(', ')})`);
    }
    const row = cells.map((c, i) => {
      if (c === '') throw new InputError(`${source}: line ${line}, column ${i + 1} (${header![i]}): missing value; allowed: a finite number`);
      const v = Number(c);
      if (!NUMBER.test(c) || !Number.isFinite(v)) throw new InputError(`${source}: line ${line}, column ${i + 1} (${header![i]}): got ${JSON.stringify(c)}; allowed: a finite number`);
      return v;
    });
    if (inc >= 0 && values.length > 0) {
      // The value as typed (0.30, not 0.3): the user finds it in the file.
      const prev = values[values.length - 1][inc];
      const place = `${source}: line ${line}, column ${inc + 1} (${header[inc]})`;
      if (row[inc] === prev) throw new InputError(`${place}: got ${cells[inc]}, the same ${incLabel} as line ${lines[lines.length - 1]}; ${incLabel} must increase strictly (merge or remove repeated rows)`);
      if (row[inc] < prev) throw new InputError(`${place}: got ${cells[inc]} after ${prev} on line ${lines[lines.length - 1]}; ${incLabel} must increase strictly (sort the rows by ${incLabel})`);
    }
    values.push(row);
    lines.push(line);
  }
  if (!header) throw new InputError(`${source}: the file is empty; expected a header row (${allowed}) and data rows`);
  if (values.length === 0) throw new InputError(`${source}: no data rows after the header on line ${headerLine}`);
  const columns: Record<string, Float64Array> = {};
  header.forEach((name, i) => (columns[name] = Float64Array.from(values, (row) => row[i])));
  const data = { source, columns, header, lines, headerLine };
  return data;
}

/** "FILE: line L, column C (NAME)" of a data row's value: the start of a message about it. */
export function cellPlace(d: ColumnData, row: number, name: string): string {
  return `${d.source}: line ${d.lines[row]}, column ${d.header.indexOf(name) + 1} (${name})`;
}

/** Every value of a column must pass `ok`; the first that does not is refused, naming its place and what is allowed. */
export function requireEach(d: ColumnData, name: string, ok: (v: number) => boolean, allowed: string): void {
  const col = d.columns[name];
  if (!col) return;
  for (let i = 0; i < col.length; i++) if (!ok(col[i])) throw new InputError(`${cellPlace(d, i, name)}: got ${col[i]}; allowed: ${allowed}`);
}

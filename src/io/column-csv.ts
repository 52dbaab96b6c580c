/**
 * A numeric CSV with a header row naming its columns (case-insensitive), for measured data
 * other than composition profiles (inverse/profile-csv.ts reads those): SLD depth profiles
 * (x, sld[, sigma]) and reflectivity curves (Q, R, dR). Hand-parsed so that every error names
 * the file, the line and the column. Blank lines and lines starting with # are skipped; CRLF
 * line ends and a UTF-8 byte-order mark are accepted. The first required column must
 * increase strictly.
 */
import { InputError } from './errors.js';

const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

export interface ColumnData {
  source: string;
  /** Columns by their name as the caller asked for it. */
  columns: Record<string, Float64Array>;
  lines: number[];
}

export function parseColumnCsv(text: string, source: string, required: string[], optional: string[] = []): ColumnData {
  const all = [...required, ...optional];
  const allowed = `${required.join(', ')}${optional.length ? `, and optionally ${optional.join(', ')}` : ''}`;
  const rows = text.replace(/^\uFEFF/, '').split(/\r?\n/);
  let header: string[] | undefined;
  let headerLine = 0;
  const values: number[][] = [];
  const lines: number[] = [];
  for (let r = 0; r < rows.length; r++) {
    const line = r + 1;
    const raw = rows[r].trim();
    if (raw === '' || raw.startsWith('#')) continue;
    const cells = raw.split(',').map((c) => c.trim());
    if (!header) {
      headerLine = line;
      header = cells.map((c, i) => {
        const name = all.find((a) => a.toLowerCase() === c.replace(/^"|"$/g, '').toLowerCase());
        if (!name) throw new InputError(`${source}: line ${line}, column ${i + 1} (${JSON.stringify(c)}): ${NUMBER.test(c) ? 'the first line must be a header row' : 'unknown column'}; allowed columns: ${allowed}`);
        return name;
      });
      for (const need of required) if (!header.includes(need)) throw new InputError(`${source}: line ${line}: the header has no ${need} column; allowed columns: ${allowed}`);
      if (new Set(header).size !== header.length) throw new InputError(`${source}: line ${line}: a column is named twice in the header`);
      continue;
    }
    if (cells.length !== header.length) throw new InputError(`${source}: line ${line}: ${cells.length} values, but the header names ${header.length} columns (${header.join(', ')})`);
    const row = cells.map((c, i) => {
      const v = Number(c);
      if (!NUMBER.test(c) || !Number.isFinite(v)) throw new InputError(`${source}: line ${line}, column ${i + 1} (${header![i]}): got ${JSON.stringify(c)}; allowed: a finite number`);
      return v;
    });
    values.push(row);
    lines.push(line);
  }
  if (!header) throw new InputError(`${source}: the file is empty; expected a header row (${allowed}) and data rows`);
  if (values.length === 0) throw new InputError(`${source}: no data rows after the header on line ${headerLine}`);
  const columns: Record<string, Float64Array> = {};
  header.forEach((name, i) => (columns[name] = Float64Array.from(values, (row) => row[i])));
  const first = columns[required[0]];
  for (let i = 1; i < first.length; i++) {
    if (!(first[i] > first[i - 1])) throw new InputError(`${source}: line ${lines[i]}, column ${header.indexOf(required[0]) + 1} (${required[0]}): got ${first[i]} after ${first[i - 1]} on line ${lines[i - 1]}; ${required[0]} must increase strictly (sort the rows)`);
  }
  return { source, columns, lines };
}

/** The domain-spacing CSV: columns N, D_nm and optionally dD_nm (any order, header row), one row per chain length. */
import { InputError } from '../io/errors.js';
import type { SpacingData } from './spacing-series.js';

const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

export function parseSpacingCsv(text: string, source: string): SpacingData {
  const rows = text.replace(/^\uFEFF/, '').split(/\r?\n/);
  let header: string[] | undefined;
  const N: number[] = [];
  const D: number[] = [];
  const dD: number[] = [];
  for (let r = 0; r < rows.length; r++) {
    const line = r + 1;
    const raw = rows[r].trim();
    if (raw === '' || raw.startsWith('#')) continue;
    const cells = raw.split(',').map((c) => c.trim().replace(/^"|"$/g, ''));
    if (!header) {
      header = cells.map((c) => c.toLowerCase());
      header.forEach((h, i) => {
        if (!['n', 'd_nm', 'dd_nm'].includes(h)) throw new InputError(`${source}: line ${line}, column ${i + 1}: unknown column ${JSON.stringify(cells[i])}; allowed columns: N, D_nm, and optionally dD_nm`);
      });
      if (!header.includes('n') || !header.includes('d_nm')) throw new InputError(`${source}: line ${line}: the header needs N and D_nm columns (dD_nm optional)`);
      continue;
    }
    if (cells.length !== header.length) throw new InputError(`${source}: line ${line}: ${cells.length} values for ${header.length} header columns`);
    const v: Record<string, number> = {};
    cells.forEach((c, i) => {
      if (!NUMBER.test(c) || !(Number(c) > 0)) throw new InputError(`${source}: line ${line}, column ${i + 1} (${header![i]}): got ${JSON.stringify(c)}; allowed: a number > 0`);
      v[header![i]] = Number(c);
    });
    N.push(v.n);
    D.push(v.d_nm);
    if (v.dd_nm !== undefined) dD.push(v.dd_nm);
  }
  if (!header || N.length === 0) throw new InputError(`${source}: no rows; expected a header (N,D_nm[,dD_nm]) and one row per chain length`);
  return { source, N, D, dD: header.includes('dd_nm') ? dD : undefined };
}

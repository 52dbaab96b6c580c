/**
 * Inputs of the Bragg tools: the measured-peaks CSV (order, q with its unit, I, dI, and
 * optionally dq), and the lamella of a solution file (solve or invert output).
 * Hand-parsed CSV so every error names the file, line and column.
 */
import { InputError, parseOrThrow } from '../../io/errors.js';
import { readJsonFile } from '../../io/load-json.js';
import { solutionFileSchema } from '../../io/formats/solution.js';
import type { SolutionFile } from '../../io/formats/solution.js';
import { FourierSeries } from '../../physics/cell/fourier-series.js';
import type { MeasuredPeaks } from './bragg-fit.js';

const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
const ALLOWED = 'order, q_per_nm or q_per_A, I, dI, and optionally dq (in the unit of q)';

export function parsePeaksCsv(text: string, source: string): MeasuredPeaks & { qUnit: 'per_nm' | 'per_A' } {
  const rows = text.replace(/^\uFEFF/, '').split(/\r?\n/);
  let header: string[] | undefined;
  const out = { order: [] as number[], q: [] as number[], dq: [] as number[], intensity: [] as number[], dI: [] as number[] };
  let scale = 1;
  let qUnit: 'per_nm' | 'per_A' = 'per_nm';
  for (let r = 0; r < rows.length; r++) {
    const line = r + 1;
    const raw = rows[r].trim();
    if (raw === '' || raw.startsWith('#')) continue;
    const cells = raw.split(',').map((c) => c.trim().replace(/^"|"$/g, ''));
    if (!header) {
      header = cells.map((c) => c.toLowerCase());
      header.forEach((h, i) => {
        if (!['order', 'q_per_nm', 'q_per_a', 'i', 'di', 'dq'].includes(h)) throw new InputError(`${source}: line ${line}, column ${i + 1}: unknown column ${JSON.stringify(cells[i])}; allowed columns: ${ALLOWED}`);
      });
      for (const need of ['order', 'i', 'di']) if (!header.includes(need)) throw new InputError(`${source}: line ${line}: the header has no ${need === 'i' ? 'I' : need === 'di' ? 'dI' : need} column; allowed columns: ${ALLOWED}`);
      if (header.includes('q_per_a')) {
        qUnit = 'per_A';
        scale = 10;
      } else if (!header.includes('q_per_nm')) throw new InputError(`${source}: line ${line}: the header has no q column; allowed columns: ${ALLOWED}`);
      continue;
    }
    if (cells.length !== header.length) throw new InputError(`${source}: line ${line}: ${cells.length} values for ${header.length} header columns`);
    const v: Record<string, number> = {};
    cells.forEach((c, i) => {
      if (!NUMBER.test(c)) throw new InputError(`${source}: line ${line}, column ${i + 1} (${header![i]}): got ${JSON.stringify(c)}; allowed: a finite number`);
      v[header![i]] = Number(c);
    });
    if (!(Number.isInteger(v.order) && v.order >= 1 && v.order <= 64)) throw new InputError(`${source}: line ${line}, column ${header.indexOf('order') + 1} (order): got ${v.order}; allowed: a whole number from 1 to 64`);
    if (out.order.includes(v.order)) throw new InputError(`${source}: line ${line}: order ${v.order} given twice`);
    if (!(v.di > 0)) throw new InputError(`${source}: line ${line}, column ${header.indexOf('di') + 1} (dI): got ${v.di}; allowed: a standard deviation > 0`);
    if (v.dq !== undefined && !(v.dq > 0)) throw new InputError(`${source}: line ${line}, column ${header.indexOf('dq') + 1} (dq): got ${v.dq}; allowed: a standard deviation > 0`);
    const q = v.q_per_nm ?? v.q_per_a;
    if (!(q > 0)) throw new InputError(`${source}: line ${line}: q = ${q}; allowed: q > 0`);
    out.order.push(v.order);
    out.q.push(q * scale);
    if (v.dq !== undefined) out.dq.push(v.dq * scale);
    out.intensity.push(v.i);
    out.dI.push(v.di);
  }
  if (!header || out.order.length === 0) throw new InputError(`${source}: no peaks; expected a header row (${ALLOWED}) and one row per order`);
  return { source, order: out.order, q: out.q, dq: header.includes('dq') ? out.dq : undefined, intensity: out.intensity, dI: out.dI, qUnit };
}

/** φ_A of a periodic solution file as its Fourier series over the cell, with the number of periods in the cell. */
export function lamellaFromSolutionFile(path: string): { phiA: FourierSeries; periods: number; chiN: number; f: number; phase: string; system: SolutionFile['system'] } {
  const file = parseOrThrow(solutionFileSchema, readJsonFile(path), path);
  const cfg = file.config as { cell?: { kind?: string } } | undefined;
  if (cfg?.cell?.kind === 'film') throw new InputError(`${path}: a film solution; Bragg peaks here are those of a periodic lamellar stack (give a periodic solution)`);
  if (file.summary.phase !== 'lamellar') throw new InputError(`${path}: the solution is ${file.summary.phase}, not lamellar: no Bragg peaks`);
  return {
    phiA: FourierSeries.fromGrid(file.grid.phiA, file.summary.length),
    periods: file.summary.periods,
    chiN: file.system.chiN,
    f: (file.summary as unknown as { f: number }).f,
    phase: file.summary.phase,
    system: file.system,
  };
}

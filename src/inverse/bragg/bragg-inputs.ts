/**
 * Inputs of the Bragg tools: the measured-peaks CSV (order, q with its unit, I, dI, and
 * optionally dq), read by io/column-csv.ts so every error names the file, line and column;
 * and the lamella of a solution file (solve or invert output).
 */
import { Q_WITH_UNIT, Q_WITH_UNIT_HINTS, cellPlace, parseColumnCsv, requireEach } from '../../io/column-csv.js';
import { InputError } from '../../io/errors.js';
import { readFormat } from '../../io/formats/file-format.js';
import { solutionFileSchema } from '../../io/formats/solution.js';
import type { SolutionFile } from '../../io/formats/solution.js';
import { FourierSeries } from '../../physics/cell/fourier-series.js';
import type { MeasuredPeaks } from './bragg-fit.js';

/** The measured-peaks CSV: one row per order, any order of rows; q converted to nm⁻¹ (Å⁻¹ × 10). */
export function parsePeaksCsv(text: string, source: string): MeasuredPeaks & { qUnit: 'per_nm' | 'per_A' } {
  const d = parseColumnCsv(text, source, ['order', 'I', 'dI'], ['dq'], { choices: [Q_WITH_UNIT], increasing: null, hints: Q_WITH_UNIT_HINTS });
  requireEach(d, 'order', (v) => Number.isInteger(v) && v >= 1 && v <= 64, 'a whole number from 1 to 64');
  const order = Array.from(d.columns.order);
  order.forEach((n, i) => {
    const first = order.indexOf(n);
    if (first < i) throw new InputError(`${cellPlace(d, i, 'order')}: order ${n} given twice (also on line ${d.lines[first]})`);
  });
  const qUnit = d.columns.q_per_nm ? 'per_nm' : 'per_A';
  const qName = `q_${qUnit}`;
  requireEach(d, qName, (v) => v > 0, 'q > 0');
  requireEach(d, 'dI', (v) => v > 0, 'a standard deviation > 0');
  requireEach(d, 'dq', (v) => v > 0, 'a standard deviation > 0');
  const scale = qUnit === 'per_A' ? 10 : 1;
  return {
    source,
    order,
    q: Array.from(d.columns[qName], (v) => v * scale),
    dq: d.columns.dq ? Array.from(d.columns.dq, (v) => v * scale) : undefined,
    intensity: Array.from(d.columns.I),
    dI: Array.from(d.columns.dI),
    qUnit,
  };
}

/** φ_A of a periodic solution file as its Fourier series over the cell, with the number of periods in the cell. */
export function lamellaFromSolutionFile(path: string): { phiA: FourierSeries; periods: number; chiN: number; f: number; phase: string; system: SolutionFile['system'] } {
  const file = readFormat(path, solutionFileSchema);
  const cfg = file.config as { cell?: { kind?: string } } | undefined;
  if (cfg?.cell?.kind === 'film') throw new InputError(`${path}: a film solution; Bragg peaks here are those of a periodic lamellar stack (give a periodic solution)`);
  if (file.summary.phase !== 'lamellar') throw new InputError(`${path}: the solution is ${file.summary.phase}, not lamellar: no Bragg peaks`);
  return {
    phiA: FourierSeries.fromGrid(file.grid.phiA, file.summary.length),
    periods: file.summary.periods,
    chiN: file.system.chiN,
    f: file.summary.f,
    phase: file.summary.phase,
    system: file.system,
  };
}

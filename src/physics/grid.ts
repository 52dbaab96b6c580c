/**
 * The periodic 1D cell: length L in Rg, Nx points x_j = j·L/Nx (SCFT-NOTES.md).
 */
import { ModelError } from './chain.js';

export interface Cell {
  length: number;
  nx: number;
}

export function checkCell(cell: Cell, field = 'cell'): void {
  if (!(cell.length > 0) || !Number.isFinite(cell.length)) throw new ModelError(`${field}.period`, cell.length, 'allowed: a finite length > 0 (in Rg)');
  if (!Number.isInteger(cell.nx) || cell.nx < 4 || (cell.nx & (cell.nx - 1)) !== 0) {
    throw new ModelError(`${field}.nx`, cell.nx, 'allowed: a power of two ≥ 4 (the FFT needs it)');
  }
}

export function gridPoints(cell: Cell): Float64Array {
  const x = new Float64Array(cell.nx);
  for (let j = 0; j < cell.nx; j++) x[j] = (j * cell.length) / cell.nx;
  return x;
}

/** Cell average (1/L)∫ u dx on the periodic grid: the plain mean, spectrally exact. */
export function cellMean(u: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < u.length; i++) s += u[i];
  return s / u.length;
}

/** max u − min u: the spread of a grid function (the order parameter of the phase verdict). */
export function spreadOf(u: ArrayLike<number>): number {
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < u.length; i++) {
    lo = Math.min(lo, u[i]);
    hi = Math.max(hi, u[i]);
  }
  return hi - lo;
}

/**
 * Periodic band-limited interpolation would need an FFT; warm starts only need a
 * smooth resample, so this is linear interpolation in the fractional coordinate x/L.
 */
export function resamplePeriodic(u: ArrayLike<number>, nx: number): Float64Array {
  const n = u.length;
  const out = new Float64Array(nx);
  if (n === nx) {
    for (let i = 0; i < nx; i++) out[i] = u[i];
    return out;
  }
  for (let j = 0; j < nx; j++) {
    const t = (j * n) / nx;
    const i0 = Math.floor(t);
    const a = t - i0;
    out[j] = (1 - a) * u[i0 % n] + a * u[(i0 + 1) % n];
  }
  return out;
}

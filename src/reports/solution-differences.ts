/**
 * Plain differences between two solutions on the same grid (network − reference): no
 * physics here, only norms of arrays the solvers already produced.
 */
import { InputError } from '../io/errors.js';
import type { ScftSolution } from '../physics/result.js';
import { gridMismatch } from '../physics/solution-metrics.js';

/** Two solutions can be compared point by point only on the same cell and grid. */
export function assertSameGrid(reference: ScftSolution, other: ScftSolution, where: string): void {
  const mismatch = gridMismatch(other, reference);
  if (mismatch) throw new InputError(`${where}: the network solution and the reference differ (${mismatch}); both must be on the same cell and grid`);
}

export function difference(a: ArrayLike<number>, b: ArrayLike<number>): Float64Array {
  const out = new Float64Array(a.length);
  for (let i = 0; i < a.length; i++) out[i] = a[i] - b[i];
  return out;
}

export function maxAbs(a: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i]));
  return m;
}


/** w_A − w_B: the exchange field, the part of the fields fixed by the composition. */
export function exchangeField(sol: ScftSolution): Float64Array {
  return difference(sol.w.A, sol.w.B);
}

export function points(x: ArrayLike<number>, y: ArrayLike<number>): { x: number; y: number }[] {
  return Array.from({ length: x.length }, (_, i) => ({ x: x[i], y: y[i] }));
}

/** Grid values plus the periodic repeat at x = L, so a curve spans the whole cell. */
export function periodicPoints(x: ArrayLike<number>, y: ArrayLike<number>, length: number): { x: number; y: number }[] {
  return [...points(x, y), { x: length, y: y[0] }];
}

/**
 * Species fields and densities on the grid, and prescribed external fields.
 * Fields are in kT per chain (w = N × per-segment field), as in docs/physics.md.
 */
import type { FieldSpec, Species, SystemSpec } from './chain-schema.js';
import { ModelError } from './chain.js';
import type { Cell } from './cell/cell.js';
import { FourierSeries } from './cell/fourier-series.js';

export type SpeciesArrays = Record<Species, Float64Array>;

export function zeroFields(nx: number): SpeciesArrays {
  return { A: new Float64Array(nx), B: new Float64Array(nx) };
}

export function cloneFields(w: SpeciesArrays): SpeciesArrays {
  return { A: Float64Array.from(w.A), B: Float64Array.from(w.B) };
}

export function fieldFromSpec(spec: FieldSpec, cell: Cell, field: string): Float64Array {
  const n = cell.n;
  const out = new Float64Array(n);
  switch (spec.type) {
    case 'uniform':
      out.fill(spec.value);
      return out;
    case 'cosine':
      for (let j = 0; j < n; j++) out[j] = spec.offset + spec.amplitude * Math.cos((2 * Math.PI * spec.mode * cell.x[j]) / cell.length);
      return out;
    case 'values':
      if (spec.values.length !== n) {
        throw new ModelError(`${field}.values`, `${spec.values.length} values`, `allowed: exactly cell.nx = ${n} values, one per grid point`);
      }
      out.set(spec.values);
      return out;
  }
}

/** The prescribed fields of a single-chain system, or undefined for a self-consistent melt. */
export function externalFields(system: SystemSpec, cell: Cell): SpeciesArrays | undefined {
  const ext = system.externalField;
  if (!ext) return undefined;
  const w = zeroFields(cell.n);
  if (ext.A) w.A = fieldFromSpec(ext.A, cell, 'system.externalField.A');
  if (ext.B) w.B = fieldFromSpec(ext.B, cell, 'system.externalField.B');
  return w;
}

/**
 * A prescribed field at arbitrary points x (Rg) of a periodic cell of length L. Tabulated
 * values (at x_j = jL/n) are read through the trigonometric interpolant of the periodic cell
 * (cell/fourier-series.ts), which is how the spectral solver itself sees a grid function.
 */
export function fieldAtPoints(spec: FieldSpec, length: number, x: ArrayLike<number>): Float64Array {
  const out = new Float64Array(x.length);
  switch (spec.type) {
    case 'uniform':
      out.fill(spec.value);
      return out;
    case 'cosine':
      for (let i = 0; i < x.length; i++) out[i] = spec.offset + spec.amplitude * Math.cos((2 * Math.PI * spec.mode * x[i]) / length);
      return out;
    case 'values':
      return FourierSeries.fromGrid(spec.values, length).evaluate(x);
  }
}

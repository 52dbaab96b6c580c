/**
 * Species fields and densities on the grid, and prescribed external fields.
 * Fields are in kT per chain (w = N × per-segment field), as in SCFT-NOTES.md.
 */
import type { FieldSpec, Species, SystemSpec } from './chain-schema.js';
import { ModelError } from './chain.js';
import type { Cell } from './grid.js';
import { trigInterpolationMatrix } from '../numerics/trig-interpolation.js';

export type SpeciesArrays = Record<Species, Float64Array>;

export function zeroFields(nx: number): SpeciesArrays {
  return { A: new Float64Array(nx), B: new Float64Array(nx) };
}

export function cloneFields(w: SpeciesArrays): SpeciesArrays {
  return { A: Float64Array.from(w.A), B: Float64Array.from(w.B) };
}

export function fieldFromSpec(spec: FieldSpec, cell: Cell, field: string): Float64Array {
  const out = new Float64Array(cell.nx);
  switch (spec.type) {
    case 'uniform':
      out.fill(spec.value);
      return out;
    case 'cosine':
      for (let j = 0; j < cell.nx; j++) out[j] = spec.offset + spec.amplitude * Math.cos((2 * Math.PI * spec.mode * j) / cell.nx);
      return out;
    case 'values':
      if (spec.values.length !== cell.nx) {
        throw new ModelError(`${field}.values`, `${spec.values.length} values`, `allowed: exactly cell.nx = ${cell.nx} values, one per grid point`);
      }
      out.set(spec.values);
      return out;
  }
}

/** The prescribed fields of a single-chain system, or undefined for a self-consistent melt. */
export function externalFields(system: SystemSpec, cell: Cell): SpeciesArrays | undefined {
  const ext = system.externalField;
  if (!ext) return undefined;
  const w = zeroFields(cell.nx);
  if (ext.A) w.A = fieldFromSpec(ext.A, cell, 'system.externalField.A');
  if (ext.B) w.B = fieldFromSpec(ext.B, cell, 'system.externalField.B');
  return w;
}

/**
 * A prescribed field at arbitrary points x (Rg) of a cell of length L. Tabulated values
 * (at x_j = jL/n) are interpolated by their trigonometric (Fourier) interpolant, which is
 * how the spectral solver itself sees a grid function.
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
      return trigInterpolate(Float64Array.from(spec.values), length, x);
  }
}

/** Trigonometric interpolation of a periodic grid function at arbitrary points. */
export function trigInterpolate(u: Float64Array, length: number, x: ArrayLike<number>): Float64Array {
  const n = u.length;
  const m = trigInterpolationMatrix(n, length, x);
  const out = new Float64Array(x.length);
  for (let j = 0; j < n; j++) for (let i = 0; i < x.length; i++) out[i] += u[j] * m[j * x.length + i];
  return out;
}

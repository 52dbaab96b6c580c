/**
 * Species fields and densities on the grid, and prescribed external fields.
 * Fields are in kT per chain (w = N × per-segment field), as in SCFT-NOTES.md.
 */
import type { FieldSpec, Species, SystemSpec } from './chain-schema.js';
import { ModelError } from './chain.js';
import type { Cell } from './grid.js';

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

/** Trigonometric interpolation of a periodic grid function (direct DFT: small n only). */
export function trigInterpolate(u: Float64Array, length: number, x: ArrayLike<number>): Float64Array {
  const n = u.length;
  const re = new Float64Array(n);
  const im = new Float64Array(n);
  for (let m = 0; m < n; m++) {
    for (let j = 0; j < n; j++) {
      const a = (-2 * Math.PI * m * j) / n;
      re[m] += u[j] * Math.cos(a);
      im[m] += u[j] * Math.sin(a);
    }
  }
  const out = new Float64Array(x.length);
  for (let i = 0; i < x.length; i++) {
    let v = re[0] / n;
    for (let m = 1; m < n; m++) {
      const mm = m <= n / 2 ? m : m - n;
      const a = (2 * Math.PI * mm * x[i]) / length;
      // For even n the Nyquist mode is real for real data and enters once, as a cosine.
      v += (re[m] * Math.cos(a) - im[m] * Math.sin(a)) / n;
    }
    out[i] = v;
  }
  return out;
}

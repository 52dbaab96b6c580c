/**
 * What a measurement of a film sees, from the film model's φ_A(z): the measurement model of a
 * fit and of the synthetic data.
 *
 * Units: depths in Rg inside (data in nm are converted at the edge with Rg in nm); SLD in
 * Å⁻² inside, 10⁻⁶ Å⁻² in files and flags; Q in Å⁻¹; the film's bottom wall (the substrate
 * side) at depth z = 0, the top wall at z = H.
 *
 * - "phi": a composition depth profile φ_A(x) at data positions x = z + offset, smeared by a
 *   Gaussian of standard deviation `width` (an instrument/interface width). The smearing is the
 *   film cell's own (mirror images at the walls, docs/physics.md, "Films"): the walls stay
 *   where they are and composition does not leak into the substrate. Every data point must lie
 *   in the film.
 * - "sld": a scattering-length-density depth profile ρ(x) over the substrate, the film and the
 *   medium above, with SLDs adding by volume fraction and the whole stack convolved with the
 *   same Gaussian width (reflectivity/sld-profile.ts).
 * - "reflectivity": specular R(Q) of that SLD profile (the width is then the Gaussian grading of
 *   every interface, roughness included) by Parratt's recursion on thin slices, averaged over
 *   the Gaussian Q resolution dQ/Q (FWHM), plus a constant background. The offset plays no
 *   part: R does not depend on where the stack sits.
 */
import type { ScftSolution } from '../../physics/result.js';
import type { FilmCell } from '../../physics/cell/film-cell.js';
import { parrattReflectivity } from '../../reflectivity/parratt.js';
import { smearedReflectivity } from '../../reflectivity/q-resolution.js';
import type { SldSteps, StackSlds } from '../../reflectivity/sld-profile.js';
import { filmSldSteps, slicedStack, smoothedSld } from '../../reflectivity/sld-profile.js';

export type FilmDataKind = 'phi' | 'sld' | 'reflectivity';

/** The measurement's own parameters (lengths in Rg). */
export interface MeasurementParams {
  width: number;
  offset: number;
}

export interface Instrument {
  /** SLDs, Å⁻² (needed for "sld" and "reflectivity"). */
  slds?: StackSlds;
  /** Rg in nm (needed for "reflectivity": Q is in Å⁻¹). */
  rgNm?: number;
  /** Gaussian Q resolution, FWHM dQ/Q. */
  dQoverQ?: number;
  /** Constant background added to R. */
  background?: number;
}

/** Film cells are resampled to this many times the solve's points before slicing into SLD steps. */
const STEP_REFINE = 4;
/** Parratt slices no thicker than this (nm): a tenth of a typical SCFT interface width. */
export const MAX_SLICE_NM = 0.2;

/**
 * The film's SLD steps (depths in Rg × `unit`: 1 for Rg, Rg in nm for nm): φ_A resampled by the
 * film's spectral interpolant onto STEP_REFINE times the solve's cells, one step per cell.
 */
export function filmSteps(cell: FilmCell, phiA: Float64Array, slds: StackSlds, unit = 1): SldSteps {
  return filmSldSteps(cell.interpolate(phiA, cell.gridWith(cell.n * STEP_REFINE)), cell.length * unit, slds);
}

export function predictPhi(cell: FilmCell, sol: ScftSolution, m: MeasurementParams, x: Float64Array): Float64Array {
  return cell.interpolate(sol.phi.A, x.map((v) => v - m.offset), m.width);
}

export function predictSld(cell: FilmCell, sol: ScftSolution, m: MeasurementParams, x: Float64Array, slds: StackSlds): Float64Array {
  const steps = filmSteps(cell, sol.phi.A, slds);
  return smoothedSld(steps, m.width, x.map((v) => v - m.offset));
}

/** The stack Parratt sees (lengths in nm). */
export function filmStack(cell: FilmCell, sol: ScftSolution, width: number, slds: StackSlds, rgNm: number) {
  const steps = filmSteps(cell, sol.phi.A, slds, rgNm);
  return slicedStack(steps, width * rgNm, MAX_SLICE_NM);
}

export function predictReflectivity(cell: FilmCell, sol: ScftSolution, width: number, q: Float64Array, inst: Required<Pick<Instrument, 'slds' | 'rgNm'>> & Instrument): Float64Array {
  const stack = filmStack(cell, sol, width, inst.slds, inst.rgNm);
  const r = smearedReflectivity((qq) => parrattReflectivity(stack, qq), q, inst.dQoverQ ?? 0);
  const bg = inst.background ?? 0;
  return bg ? r.map((v) => v + bg) : r;
}

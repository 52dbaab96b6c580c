/**
 * R(Q) of a solved film: the film solve at (χN, affinities, thickness), its SLD profile and
 * its specular reflectivity (inverse/film/film-measurement.ts holds the measurement model,
 * shared with the fits). Units: Q in Å⁻¹, SLD in Å⁻² (files: 10⁻⁶ Å⁻²), depths in nm, the
 * thickness and width given in Rg here (the caller converts nm with Rg in nm).
 */
import type { SpectralOptions } from '../../io/schemas/spectral-schema.js';
import type { ChainSpec } from '../../physics/chain-schema.js';
import type { FilmSolveStep } from '../../spectral/film-solve.js';
import { FilmModel } from './film-model.js';
import type { FilmPoint } from './film-model.js';
import { filmStack, filmSteps, predictReflectivity } from './film-measurement.js';
import type { StackSlds } from '../../reflectivity/sld-profile.js';
import { smoothedSld } from '../../reflectivity/sld-profile.js';

export interface FilmReflectivitySettings {
  chain: ChainSpec;
  chiN: number;
  bottom: number;
  top: number;
  /** Rg. */
  thickness: number;
  width: number;
  wallRange: number;
  rgNm: number;
  slds: StackSlds;
  dQoverQ: number;
  background: number;
  q: Float64Array;
  nx: number;
  ns: number;
  solver?: Partial<SpectralOptions>;
}

export interface FilmReflectivity {
  point: FilmPoint;
  q: Float64Array;
  R: Float64Array;
  /** SLD profile at depths z (nm from the substrate surface), smoothed by the width. */
  z: Float64Array;
  sld: Float64Array;
  slices: number;
  seconds: number;
}

export function filmReflectivity(s: FilmReflectivitySettings, onStep?: (step: FilmSolveStep) => void): FilmReflectivity {
  const t0 = performance.now();
  const model = new FilmModel({ chain: s.chain, nx: s.nx, ns: s.ns, wallRange: s.wallRange, solver: s.solver });
  const point = model.confirm({ chiN: s.chiN, bottom: s.bottom, top: s.top, thickness: s.thickness }, onStep);
  const inst = { slds: s.slds, rgNm: s.rgNm, dQoverQ: s.dQoverQ, background: s.background };
  const R = predictReflectivity(point.cell, point.solution, s.width, s.q, inst);
  const Hnm = s.thickness * s.rgNm;
  const margin = Math.max(2, 4 * s.width * s.rgNm);
  const count = 400;
  const z = Float64Array.from({ length: count + 1 }, (_, k) => -margin + ((Hnm + 2 * margin) * k) / count);
  const sld = smoothedSld(filmSteps(point.cell, point.solution.phi.A, s.slds, s.rgNm), s.width * s.rgNm, z);
  const slices = filmStack(point.cell, point.solution, s.width, s.slds, s.rgNm).layers.length;
  return { point, q: s.q, R, z, sld, slices, seconds: (performance.now() - t0) / 1000 };
}

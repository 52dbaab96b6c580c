/**
 * Synthetic film measurements for tests and demos: a film solved on a finer grid and contour
 * than a fit uses (so a fit meets data it did not make itself), its depth profile (φ_A or SLD)
 * or reflectivity computed by the same measurement model (film-measurement.ts), and seeded
 * Gaussian noise.
 *
 * Units: depths in Rg (files may write nm), SLD in Å⁻² here (10⁻⁶ Å⁻² in files), Q in Å⁻¹.
 * Noise: "phi" and "sld" add noise of a fixed standard deviation; "reflectivity" has a
 * relative error dR = relError·R at each Q (counting statistics make it grow with falling R;
 * a fixed fraction is the simple case) plus the background's own level.
 */
import { RunFailure } from '../../io/errors.js';
import { FILM_SYNTH_TRUTH_VERSION } from '../../io/formats/film.js';
import type { FilmSynthTruth } from '../../io/formats/film.js';
import type { SpectralOptions } from '../../io/schemas/spectral-schema.js';
import { GaussianNoise } from '../../numerics/random.js';
import type { ChainSpec } from '../../physics/chain-schema.js';
import type { FilmDataKind, Instrument } from './film-measurement.js';
import { predictPhi, predictReflectivity, predictSld } from './film-measurement.js';
import { FilmModel } from './film-model.js';
import type { FilmPoint } from './film-model.js';

export interface FilmSynthSettings {
  kind: FilmDataKind;
  chain: ChainSpec;
  chiN: number;
  bottom: number;
  top: number;
  /** Thickness, Rg. */
  thickness: number;
  wallRange: number;
  /** Interface/instrument width, Rg. */
  width: number;
  /** Data position of the bottom wall (profiles), Rg. */
  offset: number;
  points: number;
  /** Noise: standard deviation of φ_A or of the SLD (Å⁻²), or the relative error of R. */
  noise: number;
  seed: number;
  /** For "reflectivity": the Q range, Å⁻¹. */
  qRange?: [number, number];
  instrument: Instrument;
  nx: number;
  ns: number;
  solver?: Partial<SpectralOptions>;
}

export interface FilmSynth {
  x: Float64Array;
  y: Float64Array;
  clean: Float64Array;
  sigma: Float64Array;
  point: FilmPoint;
}

export function synthesizeFilm(s: FilmSynthSettings): FilmSynth {
  const model = new FilmModel({ chain: s.chain, nx: s.nx, ns: s.ns, wallRange: s.wallRange, solver: s.solver });
  const point = model.confirm({ chiN: s.chiN, bottom: s.bottom, top: s.top, thickness: s.thickness });
  if (!point.solution.converged) throw new RunFailure(`synth: the film solve did not converge (χN = ${s.chiN}, thickness ${s.thickness} Rg)`);
  const H = s.thickness;
  const m = { width: s.width, offset: s.offset };
  let x: Float64Array;
  let clean: Float64Array;
  if (s.kind === 'phi') {
    x = Float64Array.from({ length: s.points }, (_, i) => s.offset + ((i + 0.5) * H) / s.points);
    clean = predictPhi(point.cell, point.solution, m, x);
  } else if (s.kind === 'sld') {
    // From a little inside the substrate to a little into the medium.
    const margin = 0.15 * H;
    x = Float64Array.from({ length: s.points }, (_, i) => s.offset - margin + ((i + 0.5) * (H + 2 * margin)) / s.points);
    clean = predictSld(point.cell, point.solution, m, x, s.instrument.slds!);
  } else {
    const [q0, q1] = s.qRange ?? [0.008, 0.2];
    x = Float64Array.from({ length: s.points }, (_, i) => q0 + ((q1 - q0) * i) / (s.points - 1));
    clean = predictReflectivity(point.cell, point.solution, s.width, x, { ...s.instrument, slds: s.instrument.slds!, rgNm: s.instrument.rgNm! });
  }
  const sigma = s.kind === 'reflectivity' ? clean.map((v) => s.noise * v + (s.instrument.background ?? 0)) : new Float64Array(s.points).fill(s.noise);
  const g = new GaussianNoise(s.seed);
  const y = clean.map((v, i) => v + sigma[i] * g.next());
  return { x, y, clean, sigma, point };
}

/** The data CSV (in the units the fits read: x in Rg or nm, SLD in 10⁻⁶ Å⁻², Q in Å⁻¹) and the truth beside it. */
export function filmSynthFiles(s: FilmSynthSettings, d: FilmSynth, rgNm?: number): { csv: string; truth: Omit<FilmSynthTruth, 'provenance'> } {
  const xs = rgNm ?? 1;
  const SLD = 1e-6;
  let rows: string[];
  if (s.kind === 'phi') rows = ['x,phiA,sigma', ...Array.from(d.x, (v, i) => `${v * xs},${d.y[i]},${d.sigma[i]}`)];
  else if (s.kind === 'sld') rows = ['x,sld,sigma', ...Array.from(d.x, (v, i) => `${v * xs},${d.y[i] / SLD},${d.sigma[i] / SLD}`)];
  else rows = ['Q,R,dR', ...Array.from(d.x, (v, i) => `${v},${d.y[i]},${d.sigma[i]}`)];
  const truth: Omit<FilmSynthTruth, 'provenance'> = {
    kind: 'film-synth-truth',
    version: FILM_SYNTH_TRUTH_VERSION,
    measurement: s.kind,
    chain: s.chain,
    chiN: s.chiN,
    affinity: { bottom: s.bottom, top: s.top },
    thickness: s.thickness,
    ...(rgNm ? { thicknessNm: s.thickness * rgNm, rgNm } : {}),
    resolution: s.width,
    offset: s.offset,
    wallRange: s.wallRange,
    points: s.points,
    noise: s.noise,
    seed: s.seed,
    nx: s.nx,
    ns: s.ns,
    layers: d.point.layers.sequence,
    freeEnergy: d.point.solution.freeEnergy,
    ...(s.instrument.slds ? { sld: { A: s.instrument.slds.A / SLD, B: s.instrument.slds.B / SLD, substrate: s.instrument.slds.substrate / SLD, medium: s.instrument.slds.medium / SLD }, sldUnits: '1e-6 Å⁻²' } : {}),
    ...(s.kind === 'reflectivity' ? { dQoverQ: s.instrument.dQoverQ ?? 0, qRange: s.qRange } : {}),
    note: 'lengths (thickness, resolution, offset) in Rg; noise is the standard deviation of φA or of the SLD (10⁻⁶ Å⁻² in the CSV), or the relative error of R',
  };
  return { csv: `${rows.join('\n')}\n`, truth };
}

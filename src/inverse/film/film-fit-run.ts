/**
 * A film fit as the CLI runs it (`invert --film`, `reflectivity DATA`): read the data file,
 * turn the config's units into the fit's (nm → Rg, 10⁻⁶ Å⁻² → Å⁻²), fit, and build the
 * result file, the fit CSV and the summary text. Lengths in the output appear in Rg and,
 * when Rg in nm is known, again in nm (keys ending in Nm).
 */
import { parseColumnCsv } from '../../io/column-csv.js';
import { InputError } from '../../io/errors.js';
import type { FilmFitConfig } from '../../io/schemas/film-fit-config.js';
import { solutionToFile } from '../../io/formats/solution.js';
import type { SolutionFile } from '../../io/formats/solution.js';
import { throughSchema } from '../../io/formats/file-format.js';
import { FILM_FIT_RESULT_VERSION, filmFitResultSchema } from '../../io/formats/film.js';
import type { FilmFitResultFile } from '../../io/formats/film.js';
import type { Provenance } from '../../io/versions.js';
import { parseProfileCsv } from '../profile-csv.js';
import type { FilmData, FilmFitResult } from './film-fit.js';
import { fitFilm } from './film-fit.js';
import type { FilmDataKind } from './film-measurement.js';

/** 10⁻⁶ Å⁻² per SLD unit in files and flags. */
export const SLD_UNIT = 1e-6;

/** The data kind from a CSV's header: x,phiA → "phi"; x,sld → "sld"; Q,R,dR → "reflectivity". */
export function dataKindOf(text: string): FilmDataKind | undefined {
  const header = text
    .replace(/^\uFEFF/, '')
    .split(/\r?\n/)
    .map((l) => l.trim())
    .find((l) => l !== '' && !l.startsWith('#'));
  const cols = (header ?? '').split(',').map((c) => c.trim().replace(/^"|"$/g, '').toLowerCase());
  if (cols.includes('phia')) return 'phi';
  if (cols.includes('sld')) return 'sld';
  if (cols.includes('q') && cols.includes('r')) return 'reflectivity';
  return undefined;
}

/** Read a film data file; depths to Rg (÷ Rg in nm when given), SLD to Å⁻². */
export function readFilmData(text: string, source: string, rgNm: number | undefined): FilmData {
  const kind = dataKindOf(text);
  const scale = rgNm ? 1 / rgNm : 1;
  if (kind === 'phi') {
    const d = parseProfileCsv(text, source, rgNm ? { x: 'nm', rgNm, rgFrom: '--rg-nm' } : { x: 'Rg' });
    return { kind, source, x: d.x, y: d.phi, sigma: d.sigma };
  }
  if (kind === 'sld') {
    const d = parseColumnCsv(text, source, ['x', 'sld'], ['sigma']);
    const sigma = d.columns.sigma;
    sigma?.forEach((v, i) => {
      if (!(v > 0)) throw new InputError(`${source}: line ${d.lines[i]} (sigma): got ${v}; allowed: a standard deviation > 0`);
    });
    return { kind, source, x: d.columns.x.map((v) => v * scale), y: d.columns.sld.map((v) => v * SLD_UNIT), sigma: sigma?.map((v) => v * SLD_UNIT) };
  }
  if (kind === 'reflectivity') {
    const d = parseColumnCsv(text, source, ['Q', 'R'], ['dR']);
    d.columns.Q.forEach((v, i) => {
      if (!(v > 0)) throw new InputError(`${source}: line ${d.lines[i]} (Q): got ${v}; allowed: Q > 0 in Å⁻¹`);
    });
    d.columns.dR?.forEach((v, i) => {
      if (!(v > 0)) throw new InputError(`${source}: line ${d.lines[i]} (dR): got ${v}; allowed: an uncertainty > 0`);
    });
    return { kind, source, x: d.columns.Q, y: d.columns.R, sigma: d.columns.dR };
  }
  throw new InputError(`${source}: the header names no film data kind; allowed headers: x,phiA[,sigma] (composition depth profile), x,sld[,sigma] (SLD depth profile, 10⁻⁶ Å⁻²), Q,R,dR (reflectivity, Q in Å⁻¹)`);
}

export const FILM_ASSUMPTIONS = [
  'mean-field SCFT of Gaussian chains: composition fluctuations are neglected (they matter most near the order–disorder transition and for short chains)',
  'the film is laterally uniform (one dimension): parallel layers only, no islands, holes or perpendicular domains within the footprint',
  'the walls are flat and impenetrable; each wall acts on the chains through a short-range half-Gaussian surface field whose integral is its affinity (kT per chain × Rg); the fitted affinities are those of this model, not interaction energies of another model',
  'the melt is incompressible up to the walls (no depletion layer at the substrate or the free surface)',
  'SLDs add by volume fraction (equal segment volumes, no voids, no solvent uptake)',
  'one Gaussian width smears every interface of the SLD profile (roughness and depth resolution together), and one Gaussian width smears the composition profile (mirror images at the walls)',
  'the fitted χN depends on the chain model (f, segment-length ratio) and on Rg in nm through the thickness in Rg: errors in them shift χN and are not in the intervals',
];

export interface FilmFitOutput {
  result: FilmFitResultFile;
  fitCsv: string;
  solution: SolutionFile;
  summary: string;
  fit: FilmFitResult;
}

/** Run the fit of a config on data already read. */
export function runFilmFit(config: FilmFitConfig, data: FilmData, prov: Provenance, onProgress?: (stage: string, detail: string, counted: boolean) => void): FilmFitOutput {
  const rgNm = config.units.rgNm;
  const toRg = (v: number) => (rgNm ? v / rgNm : v);
  const sld = config.instrument.sld;
  const slds = sld ? { A: sld.A * SLD_UNIT, B: sld.B * SLD_UNIT, substrate: sld.substrate * SLD_UNIT, medium: sld.medium * SLD_UNIT } : undefined;
  const thickness = config.cell.thickness === 'fit' ? 'fit' : toRg(config.cell.thickness);
  const st = config.fit.start;
  const fit = fitFilm(data, {
    model: { chain: config.system.chain, nx: config.cell.nx, ns: config.cell.ns, wallRange: config.cell.walls.range, solver: config.solver },
    thickness,
    thicknessStart: config.cell.thicknessStart !== undefined ? toRg(config.cell.thicknessStart) : undefined,
    instrument: { slds, rgNm, dQoverQ: config.instrument.dQoverQ, background: config.instrument.background },
    chiNRange: config.fit.chiNRange,
    affinityRange: config.fit.affinityRange,
    start: { chiN: st.chiN, bottom: st.bottom, top: st.top, width: st.resolution !== undefined ? toRg(st.resolution) : undefined },
    intervals: config.fit.intervals,
    sources: { thickness: '--film', chiNRange: '--chiN-range' },
    onProgress,
  });
  const withNm = (key: string, v: number) => ({ [key]: v, ...(rgNm ? { [`${key}Nm`]: v * rgNm } : {}) });
  const P = fit.params;
  // Built through its schema (io/formats/film.ts): what is returned is exactly what result.json holds.
  const result = throughSchema(filmFitResultSchema, {
    kind: 'film-fit-result',
    version: FILM_FIT_RESULT_VERSION,
    provenance: prov,
    config,
    input: { source: data.source, dataKind: data.kind, points: data.x.length, lengthUnits: rgNm ? 'nm' : 'Rg', ...(rgNm ? { rgNm } : {}), sldUnits: '1e-6 Å⁻²', qUnits: 'Å⁻¹' },
    chiN: P.chiN,
    affinity: { bottom: P.bottom, top: P.top, units: 'kT per chain × Rg' },
    ...withNm('thickness', P.thickness),
    thicknessFitted: config.cell.thickness === 'fit',
    ...withNm('resolution', P.width),
    ...(data.kind !== 'reflectivity' ? withNm('offset', P.offset) : {}),
    intervals: fit.intervals,
    profiles: fit.profiles,
    chi2: fit.chi2,
    reducedChi2: fit.reducedChi2,
    n: fit.n,
    p: fit.p,
    dof: fit.dof,
    sigma: fit.sigma.source === 'column' ? { source: 'column' } : { source: 'estimated', value: data.kind === 'sld' ? fit.sigma.value! / SLD_UNIT : fit.sigma.value },
    layers: fit.point.layers.sequence,
    freeEnergy: fit.point.solution.freeEnergy,
    seconds: fit.seconds,
    cost: fit.cost,
    warnings: fit.warnings,
    notes: fit.notes,
    assumptions: FILM_ASSUMPTIONS,
    // The data against the model in the file's own units (what a report draws; fit.csv has the same).
    curve: curveOf(data, fit, rgNm),
  });
  return { result, fitCsv: filmFitCsv(data, fit, rgNm), solution: solutionToFile(fit.point.solution, prov, config), summary: filmFitSummary(result, fit, rgNm), fit };
}

function curveOf(data: FilmData, fit: FilmFitResult, rgNm?: number) {
  const yOut = data.kind === 'sld' ? 1 / SLD_UNIT : 1;
  const xOut = data.kind === 'reflectivity' ? 1 : rgNm ?? 1;
  return {
    xUnits: data.kind === 'reflectivity' ? 'Å⁻¹' : rgNm ? 'nm' : 'Rg',
    yUnits: data.kind === 'sld' ? '1e-6 Å⁻²' : '–',
    x: Array.from(data.x, (v) => v * xOut),
    y: Array.from(data.y, (v) => v * yOut),
    sigma: Array.from(data.x, (_, i) => (data.sigma ? data.sigma[i] : fit.sigma.value!) * yOut),
    fit: Array.from(fit.fit, (v) => v * yOut),
  };
}

/** The data, the model and the residuals at each point, in the file's own units. */
export function filmFitCsv(data: FilmData, fit: FilmFitResult, rgNm?: number): string {
  const sldOut = data.kind === 'sld' ? 1 / SLD_UNIT : 1;
  const xOut = data.kind === 'reflectivity' ? 1 : rgNm ?? 1;
  const head = data.kind === 'reflectivity' ? 'Q,R,dR,fit,residual' : data.kind === 'sld' ? 'x,sld,sigma,fit,residual' : 'x,phiA,sigma,fit,residual';
  const rows = [head];
  for (let i = 0; i < data.x.length; i++) {
    const sigma = data.sigma ? data.sigma[i] : fit.sigma.value!;
    rows.push([data.x[i] * xOut, data.y[i] * sldOut, sigma * sldOut, fit.fit[i] * sldOut, fit.residual[i] * sldOut].map(String).join(','));
  }
  return `${rows.join('\n')}\n`;
}

function filmFitSummary(result: FilmFitResultFile, fit: FilmFitResult, rgNm?: number): string {
  const f = (v: number) => v.toPrecision(5);
  const L = (v: number) => `${f(v)} Rg${rgNm ? ` (${f(v * rgNm)} nm)` : ''}`;
  const lines: string[] = [];
  const iv = (name: 'chiN' | 'bottom' | 'top') => {
    const i = fit.intervals[name];
    return i ? `, 68.3% [${f(i['68.3%'].lo)}, ${f(i['68.3%'].hi)}], 95% [${f(i['95%'].lo)}, ${f(i['95%'].hi)}] (profile likelihood)` : '';
  };
  const P = fit.params;
  lines.push(`film fit to ${fit.kind === 'phi' ? 'a composition depth profile' : fit.kind === 'sld' ? 'an SLD depth profile' : 'a reflectivity curve'} (${fit.n} points)`);
  lines.push(`  χN = ${f(P.chiN)}${iv('chiN')}`);
  lines.push(`  bottom-wall affinity ${f(P.bottom)}${iv('bottom')} kT per chain × Rg`);
  lines.push(`  top-wall affinity ${f(P.top)}${iv('top')} kT per chain × Rg`);
  lines.push(`  thickness ${L(P.thickness)} (${result.thicknessFitted ? 'fitted' : 'given'}), interface width ${L(P.width)}${fit.kind !== 'reflectivity' ? `, offset ${L(P.offset)}` : ''}`);
  lines.push(`  layers ${fit.point.layers.sequence} (bottom first), F = ${fit.point.solution.freeEnergy.toFixed(5)} kT per chain`);
  lines.push(`  χ² = ${f(fit.chi2)} for n − p = ${fit.dof}, reduced χ² = ${fit.reducedChi2.toPrecision(4)}, sigma ${fit.sigma.source === 'column' ? 'from the file' : 'estimated from the residuals'}`);
  lines.push(`  ${fit.seconds.fit.toFixed(1)} s fit + ${fit.seconds.intervals.toFixed(1)} s intervals (${fit.cost.solves} warm-started film solves, ${fit.cost.fullSolves} full ones)`);
  for (const w of fit.warnings) lines.push(`  WARNING: ${w}`);
  for (const n of fit.notes) lines.push(`  note: ${n}`);
  lines.push('assumptions (the fitted χN and affinities hold only within them):');
  for (const a of FILM_ASSUMPTIONS) lines.push(`  - ${a}`);
  return `${lines.join('\n')}\n`;
}

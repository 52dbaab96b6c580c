/**
 * A `fit-bragg` run as its config says: the peaks file read, the fit, and the result file's
 * value (io/formats/measurement-fits.ts) with the assumptions χN rests on. The CLI and the
 * tests call this one function.
 */
import { InputError } from '../../io/errors.js';
import { readInputText } from '../../io/fs-errors.js';
import { BRAGG_FIT_VERSION, braggFitFileSchema } from '../../io/formats/measurement-fits.js';
import type { BraggFitFile } from '../../io/formats/measurement-fits.js';
import { buildChain } from '../../physics/chain.js';
import { formatNumber } from '../../io/number-format.js';
import { throughSchema } from '../../io/formats/file-format.js';
import type { BraggFitConfig } from '../../io/schemas/bragg-fit-config.js';
import type { Provenance } from '../../io/versions.js';
import { deltaChi2Levels } from '../confidence.js';
import { fitBragg } from './bragg-fit.js';
import { parsePeaksCsv } from './bragg-inputs.js';

export interface BraggRunOptions {
  provenance: Provenance;
  /** What set units.rgNm (a flag or the config's key), named in messages. */
  rgSource?: string;
  rangeSource?: string;
  onEvaluation?: (evaluations: number, chiN: number, chi2: number) => void;
}

export function runBraggFit(path: string, config: BraggFitConfig, o: BraggRunOptions): BraggFitFile {
  const text = readInputText(path);
  const data = parsePeaksCsv(text, path);
  const rg = config.units.rgNm !== undefined ? { nm: config.units.rgNm, sd: config.units.rgNmSd, source: o.rgSource ?? 'units.rgNm' } : undefined;
  const fit = fitBragg(data, {
    chain: config.system.chain,
    nx: config.cell.nx,
    ns: config.cell.ns,
    options: config.solver,
    lorentz: config.lorentz,
    chiNRange: config.chiNRange as [number, number] | undefined,
    rangeSource: o.rangeSource,
    rg,
    onEvaluation: o.onEvaluation,
  });
  if (!Number.isFinite(fit.chi2)) throw new InputError(`${path}: no ordered lamella in the χN range gives these peaks (every model point was disordered); check f and the χN range`);
  const chain = config.system.chain as { segmentRatio?: number };
  const assumptions = [
    `mean-field lamellae of the chain as given (f = ${formatNumber(buildChain(config.system.chain).speciesFraction.A, 4)}, b_A/b_B = ${formatNumber(chain.segmentRatio ?? 1)}), monodisperse, at their stress-free period`,
    'integrated peak intensities in the kinematic approximation, proportional to |c_n|² of φ_A; no thermal (Debye–Waller) or grain-size damping',
    rg
      ? `D tied to Rg = ${formatNumber(rg.nm)} nm${rg.sd ? ` ± ${formatNumber(rg.sd)} nm (Gaussian constraint)` : ' (exact)'}: χN also rests on this Rg`
      : 'D fitted freely from the positions: χN rests on the relative intensities alone, not on any Rg',
    config.lorentz ? 'the intensities carry the powder Lorentz factor 1/q²' : 'no Lorentz factor (single-crystal or already corrected intensities)',
  ];
  const peaks = data.order.map((order, i) => ({
    order,
    q: data.q[i],
    I: data.intensity[i],
    dI: data.dI[i],
    relative: fit.model[i].relative,
    model: fit.model[i].intensity,
    normalisedResidual: (data.intensity[i] - fit.model[i].intensity) / data.dI[i],
  }));
  const thresholds = deltaChi2Levels(false, fit.dof);
  return throughSchema(braggFitFileSchema, {
    kind: 'bragg-fit',
    version: BRAGG_FIT_VERSION,
    provenance: o.provenance,
    config,
    file: path,
    qUnit: data.qUnit,
    assumptions,
    chiN: fit.chiN,
    intervals: fit.intervals,
    thresholds,
    periodNm: fit.periodNm,
    periodNmSd: fit.periodNmSd,
    period: fit.periodRg,
    impliedRgNm: fit.impliedRgNm,
    K: fit.K,
    chi2: fit.chi2,
    dof: fit.dof,
    peaks,
    profile: fit.profile,
    rgTie: fit.rgTie,
    notes: fit.notes,
    evaluations: fit.evaluations,
    seconds: fit.seconds,
  });
}

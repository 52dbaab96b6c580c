/**
 * A `fit-spacing` run as its config says: the spacing file read, the fit, and the result
 * file's value (io/formats/measurement-fits.ts) with the assumptions χ rests on. The CLI and
 * the tests call this one function.
 */
import { readInputText } from '../io/fs-errors.js';
import { SPACING_FIT_VERSION, spacingFitFileSchema } from '../io/formats/measurement-fits.js';
import type { SpacingFitFile } from '../io/formats/measurement-fits.js';
import { buildChain } from '../physics/chain.js';
import { formatNumber } from '../io/number-format.js';
import { throughSchema } from '../io/formats/file-format.js';
import type { SpacingFitConfig } from '../io/schemas/spacing-fit-config.js';
import type { Provenance } from '../io/versions.js';
import { deltaChi2Levels } from './confidence.js';
import { parseSpacingCsv } from './spacing-csv.js';
import { fitSpacingSeries } from './spacing-series.js';

export function runSpacingFit(path: string, config: SpacingFitConfig, o: { provenance: Provenance; onEvaluation?: (evaluations: number, chi: number, chi2: number) => void }): SpacingFitFile {
  const text = readInputText(path);
  const data = parseSpacingCsv(text, path);
  const fit = fitSpacingSeries(data, {
    chain: config.system.chain,
    nx: config.cell.nx,
    ns: config.cell.ns,
    options: config.solver,
    chiRange: config.chiRange as [number, number] | undefined,
    onEvaluation: o.onEvaluation,
  });
  const chain = config.system.chain as { segmentRatio?: number };
  const estimated = fit.sigma.source === 'estimated';
  const thresholds = deltaChi2Levels(estimated, fit.dof);
  return throughSchema(spacingFitFileSchema, {
    kind: 'spacing-fit',
    version: SPACING_FIT_VERSION,
    provenance: o.provenance,
    config,
    file: path,
    assumptions: [
      `mean-field lamellae of the chain as given (f = ${formatNumber(buildChain(config.system.chain).speciesFraction.A, 4)}, b_A/b_B = ${formatNumber(chain.segmentRatio ?? 1)}) at their stress-free period, the same f and b for every N`,
      'one temperature and chemistry: χ per reference segment is the same for every sample; N counts reference segments',
      'Rg = b·sqrt(N/6) (Gaussian chains, monodisperse)',
    ],
    chi: fit.chi,
    b: fit.b,
    intervals: fit.intervals,
    thresholds,
    chi2: fit.chi2,
    dof: fit.dof,
    sigma: fit.sigma,
    chiRange: fit.chiRange,
    points: data.N.map((N, i) => ({ N, D: data.D[i], dD: data.dD ? data.dD[i] : null, chiN: fit.model[i].chiN, period: fit.model[i].periodRg, model: fit.model[i].D })),
    profile: fit.profile,
    notes: fit.notes,
    evaluations: fit.evaluations,
    seconds: fit.seconds,
  });
}

/**
 * The model's assumptions, stated once: every result that rests on the SCFT model (a solve,
 * a network, an inversion, a report) prints this list, so a χN used for a decision carries
 * the limits it was computed under. The cell kind decides the geometric assumption; a fitted
 * χN adds the caution that it inherits all of them.
 */
import type { CellKind } from './cell/cell.js';

const COMMON: readonly string[] = [
  'mean-field SCFT: no fluctuation corrections (at finite N composition fluctuations shift the order–disorder transition and the effective χN; the transition here is the mean-field one)',
  'incompressible A/B melt (φA + φB = 1 at every point) with a Flory–Huggins χ; the pressure-like field only enforces incompressibility',
  'Gaussian (continuous, flexible) chains with the given block fractions and one statistical segment length per species; no finite extensibility, no stiffness',
];

const GEOMETRY: Record<CellKind, string> = {
  periodic: 'one-dimensional lamellae in a periodic cell, compared with the disordered melt only: other morphologies (cylinders, gyroid, spheres) are not considered and may be more stable',
  film: 'a film between flat walls, composition varying across the film only (one dimension): reflecting walls with short-range surface fields of the given affinities; lateral structure (perpendicular lamellae, islands and holes) is not resolved',
};

const FIT_CAUTION =
  'a χN fitted to data inherits these assumptions and those on f, the segment lengths and Rg: it is the value that makes this model reproduce the data, not a model-free measurement of χ';

/** The assumptions behind a result in a cell of this kind; `fitted` adds the caution on a fitted χN. */
export function modelAssumptions(cell: CellKind, fitted: boolean): string[] {
  return [...COMMON, GEOMETRY[cell], ...(fitted ? [FIT_CAUTION] : [])];
}

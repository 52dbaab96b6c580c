/**
 * What an `invert` run's caller needs before the run itself (inverse/invert-run.ts) loads: the
 * profile read and checked (a bad file is refused before a worker thread starts for it) and
 * the run's counted phases for its progress. Kept apart from the run so the CLI's main thread
 * does not load the classical solver that the worker thread loads again.
 */
import { readInputText } from '../io/fs-errors.js';
import type { InvertConfig } from '../io/schemas/invert-config.js';
import { lengthUnits, parseProfileCsv } from './profile-csv.js';

export type InvertPhaseName = 'classical fit' | 'assumed inputs' | 'network';

/** The run's counted phases, for a whole-run time left: their sizes follow from the config alone. */
export function invertPhases(config: InvertConfig): { name: InvertPhaseName; units: number; unit: string; estimated?: boolean }[] {
  const units = lengthUnits(config.units ?? {});
  // A classical fit takes about 50 χN evaluations (measured: 49 on the measurement CLI test's
  // profile); each uncertain f or segment ratio takes two refits, and the Rg sensitivity two more.
  const rgSensitivity = units.x === 'nm' && config.cell.period === 'equilibrium' && config.units?.rgNmSd === undefined;
  const refits = 2 * ((config.uncertainty?.f !== undefined ? 1 : 0) + (config.uncertainty?.segmentRatio !== undefined ? 1 : 0)) + (rgSensitivity ? 2 : 0);
  const classical = config.method !== 'network';
  const network = config.method !== 'classical';
  return [
    { name: 'classical fit', units: classical ? 50 : 0, unit: 'evaluations', estimated: true },
    { name: 'assumed inputs', units: classical ? refits : 0, unit: 'refits' },
    { name: 'network', units: network ? config.network.seeds * (config.network.adamSteps + config.network.lbfgsIterations) : 0, unit: 'steps' },
  ];
}

export function readProfile(profilePath: string, config: InvertConfig): ReturnType<typeof parseProfileCsv> {
  return parseProfileCsv(readInputText(profilePath), profilePath, lengthUnits(config.units ?? {}));
}

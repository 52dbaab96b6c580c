/**
 * The `--thickness-scan FROM:TO:POINTS` flag of solve (thicknesses in Rg). Its own module so that
 * the solve command's flags load without the film solver (start-up of `solve --help`).
 */
import { InputError } from '../io/errors.js';

/** Parse `FROM:TO:POINTS` (Rg) of `flag`. */
export function parseScanRange(flag: string, text: string): { from: number; to: number; points: number } {
  const parts = text.split(':').map((p) => Number(p.trim()));
  const [from, to, points] = parts;
  if (parts.length !== 3 || !parts.every(Number.isFinite) || !(from > 0 && to > from) || !(Number.isInteger(points) && points >= 3 && points <= 400))
    throw new InputError(`${flag}: got "${text}"; expected FROM:TO:POINTS in Rg with 0 < FROM < TO and 3 ≤ POINTS ≤ 400 (an integer), e.g. 3:12:37`);
  return { from, to, points };
}

/**
 * The unit trap: positions in nm read as Rg. A lamellar period of tens of nm read as tens
 * of Rg is many times any equilibrium period of the chain, and a fit would either fail or
 * return a meaningless χN. The data's own period (periodogram, objective.ts) is compared
 * with the chain's period at the RPA spinodal, L_s = 2π/q* (the shortest equilibrium
 * period near the transition). The equilibrium period grows slowly with χN (measured with
 * the reference at 128 × 200: L_eq(60)/L_s = 1.61 at f = 0.5 and 1.67 at f = 0.25; about
 * χN^(1/6) in strong segregation), so periods beyond 2.5 L_s × (χN_max/60)^(1/6), or below
 * L_s/2, cannot be in Rg.
 */
import { InputError } from '../io/errors.js';
import { median } from '../numerics/median.js';
import type { ChainSpec } from '../physics/chain-schema.js';
import { buildChain } from '../physics/chain.js';
import { spinodal } from '../physics/rpa.js';
import { periodogramPeriod } from './objective.js';
import type { ProfileData } from './profile-csv.js';

export const PERIOD_RATIO_LIMITS: [number, number] = [0.5, 2.5];

/** Throws an InputError naming --rg-nm when x is read as Rg and the data's period is no lamellar period in Rg. */
export function checkLengthScale(data: ProfileData, chain: ChainSpec, chiNMax = 60): void {
  if (data.units.x !== 'Rg') return;
  const n = data.x.length;
  if (n < 8) return;
  const span = data.x[n - 1] - data.x[0];
  const spacing = median(Array.from({ length: n - 1 }, (_, i) => data.x[i + 1] - data.x[i]));
  const lo = 4 * spacing;
  const hi = 2 * span;
  if (!(lo < hi)) return;
  const weight = data.sigma ? data.sigma.map((s) => 1 / (s * s)) : new Float64Array(n).fill(1);
  const period = periodogramPeriod({ x: data.x, phi: data.phi, weight }, lo, hi);
  const ls = spinodal(buildChain(chain)).period;
  const ratio = period / ls;
  const upper = PERIOD_RATIO_LIMITS[1] * Math.max(1, Math.pow(chiNMax / 60, 1 / 6));
  if (ratio > upper || ratio < PERIOD_RATIO_LIMITS[0]) {
    throw new InputError(
      `${data.source}: x is read in Rg (no unit given), but the data's period is ${period.toPrecision(4)} in those units, ${ratio.toPrecision(3)} times this chain's lamellar period near the transition (${ls.toPrecision(4)} Rg); equilibrium periods up to χN = ${chiNMax} lie within ${PERIOD_RATIO_LIMITS[0]}–${upper.toPrecision(3)} times it. The units of x look wrong: if x is in nm, give --rg-nm R (or --segments N --segment-length-nm b), or name the column x_nm`,
    );
  }
}

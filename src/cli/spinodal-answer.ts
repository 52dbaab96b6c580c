/**
 * What `mesofield spinodal` prints for a chain: the one text of that answer, used by the
 * command (commands/spinodal.ts) and by its quick path (quick-answer.ts), so the two cannot differ.
 * Units: χN dimensionless, q*·Rg dimensionless, the period 2π/q* in Rg.
 */
import type { ChainSpec } from '../physics/chain-schema.js';
import { buildChain } from '../physics/chain.js';
import { spinodal } from '../physics/rpa.js';

/** The stdout text for a validated chain: one line, or JSON with `json`. */
export function spinodalAnswer(spec: ChainSpec, json: boolean): string {
  const chain = buildChain(spec);
  const sp = spinodal(chain);
  const out = { chain: chain.label, f: chain.speciesFraction.A, chiNSpinodal: sp.chiN, qStarRg: sp.qRg, period: sp.period };
  if (json) return `${JSON.stringify(out, null, 2)}\n`;
  return `chain ${out.chain}: (χN)_s = ${sp.chiN.toFixed(6)}, q*·Rg = ${sp.qRg.toFixed(6)}, period 2π/q* = ${sp.period.toFixed(6)} Rg\n`;
}

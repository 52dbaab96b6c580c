/**
 * `spinodal`'s flags read without commander or zod, for the quick path (quick-answer.ts). It
 * accepts only what the command itself would accept with the same result and says null to
 * anything else, so every unusual or bad call goes to the command and gets its own messages
 * and exit code. "The same result": the flags as commander reads them (`--flag value` or
 * `--flag=value`, the last one given wins, the command's defaults), the numbers read by the
 * same strict reader (decimal-text.ts), then the bounds the chain schema is built from
 * (physics/chain-bounds.ts), with the flag names and defaults of the command's own table
 * (spinodal-flags.ts); tests/cli/quick-answer.test.ts checks the
 * result against that schema on many inputs, the fault suite's bad ones among them.
 */
import type { ChainSpec } from '../physics/chain-schema.js';
import type { ChainBound } from '../physics/chain-bounds.js';
import { FIRST_BLOCK_SHARE_BOUND, FRACTION_BOUND, SEGMENT_RATIO_BOUND, withinBound } from '../physics/chain-bounds.js';
import { parseDecimal } from './decimal-text.js';
import { SPINODAL_SWITCHES, SPINODAL_VALUED_FLAGS } from './spinodal-flags.js';
import type { SpinodalValuedFlag } from './spinodal-flags.js';

const VALUED = new Map(SPINODAL_VALUED_FLAGS.map((o) => [o.flag, o]));
const SWITCHES = new Set<string>(SPINODAL_SWITCHES.map((o) => o.flag));
const VALUED_BY_KEY = Object.fromEntries(SPINODAL_VALUED_FLAGS.map((o) => [o.key, o.flag])) as Record<SpinodalValuedFlag['key'], string>;

/** The chain and --json for the arguments after `spinodal`, or null: let the command answer. */
export function quickSpinodalFlags(args: readonly string[]): { spec: ChainSpec; json: boolean } | null {
  const text = Object.fromEntries(SPINODAL_VALUED_FLAGS.map((o) => [o.key, o.default])) as Record<SpinodalValuedFlag['key'], string>;
  let json = false;
  for (let i = 0; i < args.length; i++) {
    const a = args[i];
    if (SWITCHES.has(a)) {
      if (a === '--json') json = true;
      continue;
    }
    const eq = a.indexOf('=');
    const flag = VALUED.get(eq > 0 ? a.slice(0, eq) : a);
    if (flag === undefined) return null;
    const value = eq > 0 ? a.slice(eq + 1) : args[++i];
    // A missing value, or one that looks like a flag: commander's own reading (and messages) decide.
    if (value === undefined || value.startsWith('-')) return null;
    text[flag.key] = value;
  }
  /** The flag's number if the command would accept it as is (the chain schema's bounds), else null. */
  const number = (key: SpinodalValuedFlag['key'], bound: ChainBound): number | null => {
    const v = parseDecimal(VALUED_BY_KEY[key], text[key]);
    return typeof v === 'number' && withinBound(v, bound) ? v : null;
  };
  const f = number('f', FRACTION_BOUND);
  const segmentRatio = number('segmentRatio', SEGMENT_RATIO_BOUND);
  if (f === null || segmentRatio === null) return null;
  if (text.chain === 'diblock') return { spec: { type: 'diblock', f, segmentRatio }, json };
  if (text.chain !== 'triblock') return null;
  const firstBlockShare = number('firstBlockShare', FIRST_BLOCK_SHARE_BOUND);
  if (firstBlockShare === null) return null;
  return { spec: { type: 'triblock', f, firstBlockShare, segmentRatio }, json };
}

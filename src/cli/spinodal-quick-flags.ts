/**
 * `spinodal`'s flags read without commander or zod, for the quick path (quick-answer.ts). It
 * accepts only what the command itself would accept with the same result and says null to
 * anything else, so every unusual or bad call goes to the command and gets its own messages
 * and exit code. "The same result": the flags as commander reads them (`--flag value` or
 * `--flag=value`, the last one given wins, the command's defaults), the numbers read by the
 * same strict reader (decimal-text.ts), then exactly the bounds of chainSchema's diblock and
 * triblock variants (physics/chain-schema.ts); tests/cli/quick-answer.test.ts checks the
 * result against that schema on many inputs, the fault suite's bad ones among them.
 */
import type { ChainSpec } from '../physics/chain-schema.js';
import { parseDecimal } from './decimal-text.js';

const VALUED = new Map([
  ['--chain', 'chain'],
  ['--f', 'f'],
  ['--first-block-share', 'firstBlockShare'],
  ['--segment-ratio', 'segmentRatio'],
]);
const SWITCHES = new Set(['--json', '--quiet']);

/** The chain and --json for the arguments after `spinodal`, or null: let the command answer. */
export function quickSpinodalFlags(args: readonly string[]): { spec: ChainSpec; json: boolean } | null {
  const text: Record<string, string> = { chain: 'diblock', f: '0.5', firstBlockShare: '0.5', segmentRatio: '1' };
  let json = false;
  for (let i = 0; i < args.length; i++) {
    const a = args[i];
    if (SWITCHES.has(a)) {
      if (a === '--json') json = true;
      continue;
    }
    const eq = a.indexOf('=');
    const name = eq > 0 ? a.slice(0, eq) : a;
    const key = VALUED.get(name);
    if (key === undefined) return null;
    const value = eq > 0 ? a.slice(eq + 1) : args[++i];
    // A missing value, or one that looks like a flag: commander's own reading (and messages) decide.
    if (value === undefined || value.startsWith('-')) return null;
    text[key] = value;
  }
  const number = (flag: string, key: string): number | null => {
    const v = parseDecimal(flag, text[key]);
    return typeof v === 'number' ? v : null;
  };
  const f = number('--f', 'f');
  const segmentRatio = number('--segment-ratio', 'segmentRatio');
  // chainSchema: f > 0 and < 1; segmentRatio > 0 and ≤ 10; firstBlockShare > 0 and < 1.
  if (f === null || !(f > 0 && f < 1)) return null;
  if (segmentRatio === null || !(segmentRatio > 0 && segmentRatio <= 10)) return null;
  if (text.chain === 'diblock') return { spec: { type: 'diblock', f, segmentRatio }, json };
  if (text.chain !== 'triblock') return null;
  const firstBlockShare = number('--first-block-share', 'firstBlockShare');
  if (firstBlockShare === null || !(firstBlockShare > 0 && firstBlockShare < 1)) return null;
  return { spec: { type: 'triblock', f, firstBlockShare, segmentRatio }, json };
}

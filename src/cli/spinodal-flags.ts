/**
 * `spinodal`'s flags, in one table: the command registers them with commander from it
 * (commands/spinodal.ts), and the quick reading (spinodal-quick-flags.ts), which answers before
 * commander loads, reads the same names and defaults. No zod and no commander here.
 */
import { FIRST_BLOCK_SHARE_DEFAULT, SEGMENT_RATIO_DEFAULT } from '../physics/chain-bounds.js';

export interface SpinodalValuedFlag {
  /** As typed, and with commander's placeholder for the help. */
  flag: string;
  placeholder: string;
  /** The key commander gives the value under (its camel case of the flag). */
  key: 'chain' | 'f' | 'firstBlockShare' | 'segmentRatio';
  help: string;
  /** The default as text, as commander passes it to the action. */
  default: string;
}

export const SPINODAL_VALUED_FLAGS: readonly SpinodalValuedFlag[] = [
  { flag: '--chain', placeholder: '<type>', key: 'chain', help: 'chain architecture: diblock | triblock', default: 'diblock' },
  { flag: '--f', placeholder: '<f>', key: 'f', help: 'A fraction of the chain', default: '0.5' },
  { flag: '--first-block-share', placeholder: '<t>', key: 'firstBlockShare', help: 'triblock: share of A in the first A block', default: String(FIRST_BLOCK_SHARE_DEFAULT) },
  { flag: '--segment-ratio', placeholder: '<r>', key: 'segmentRatio', help: 'conformational asymmetry b_A/b_B (lengths in Rg of a chain of segment length b_B)', default: String(SEGMENT_RATIO_DEFAULT) },
];

/** Flags without a value. */
export const SPINODAL_SWITCHES: readonly { flag: '--json' | '--quiet'; help: string }[] = [
  { flag: '--json', help: 'print JSON on stdout' },
  { flag: '--quiet', help: 'no messages on stderr (spinodal prints none; accepted like on every command)' },
];

/**
 * The allowed ranges and defaults of a chain's numbers, in one place without zod: the chain
 * schema (chain-schema.ts) is built from them, and the quick reading of `spinodal`'s flags
 * (cli/spinodal-quick-flags.ts), which answers before zod loads, checks against the same values.
 * Each range is open below (`above`) and either open (`below`) or closed (`atMost`) above.
 */
export interface ChainBound {
  above: number;
  below?: number;
  atMost?: number;
}

/** A volume fraction of the chain (f): 0 < f < 1. */
export const FRACTION_BOUND = { above: 0, below: 1 } as const satisfies ChainBound;
/** Conformational asymmetry b_A/b_B and a block's segment length: 0 < r ≤ 10, default 1. */
export const SEGMENT_RATIO_BOUND = { above: 0, atMost: 10 } as const satisfies ChainBound;
export const SEGMENT_RATIO_DEFAULT = 1;
/** A triblock's share of its A material in the first A block: 0 < t < 1, default ½ (the symmetric ABA). */
export const FIRST_BLOCK_SHARE_BOUND = { above: 0, below: 1 } as const satisfies ChainBound;
export const FIRST_BLOCK_SHARE_DEFAULT = 0.5;

/** Whether v lies in the range (NaN never does). */
export function withinBound(v: number, b: ChainBound): boolean {
  return v > b.above && (b.below === undefined || v < b.below) && (b.atMost === undefined || v <= b.atMost);
}

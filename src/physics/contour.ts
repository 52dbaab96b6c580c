/**
 * The contour grid of a chain and the one quadrature of the densities, defined once for every
 * solver (the spectral reference in float64, the networks' tensor grid, the inverse tools).
 *
 * Units and conventions (docs/physics.md): s ∈ [0, 1] from the chain's first end; block b
 * covers [start_b, end_b] and holds n_b contour steps of its own size h_b = (end_b − start_b)/n_b,
 * n_b even and ≥ 2. A step never straddles a junction (the field jumps there), and Simpson's
 * rule applies on each block (pairs of intervals). The nodes are s_0 = 0 < … < s_ns = 1 with
 * ns = Σ n_b; each junction is one node.
 *
 * Densities (Simpson's rule per block; the junction node takes the end weight of the block it
 * closes and of the block it opens, each for that block's species):
 *   φ_K(x) = (1/Q) Σ_i c^K_i q(x, s_i) q†(x, 1 − s_i),   c^K_i = (h_b/3)·(1, 4, 2, …, 2, 4, 1).
 * q† runs along the reversed chain with the same steps in reverse order, so its node ns − i
 * sits at s = 1 − s_i exactly.
 */
import type { Species } from './chain-schema.js';
import type { Chain } from './chain.js';
import { ModelError } from './chain.js';
import type { SpeciesArrays } from './fields.js';

export interface ContourBlock {
  /** Steps on this block (even, ≥ 2) and their size h = (end − start)/steps. */
  steps: number;
  h: number;
  start: number;
  end: number;
  /** Index of the block's first node in the chain's node list. */
  offset: number;
}

export interface Contour {
  /** One entry per block of the chain, in chain order. */
  blocks: ContourBlock[];
  /** Total steps Σ n_b. */
  ns: number;
  /** Node positions s_0 = 0 … s_ns = 1. */
  s: Float64Array;
  /** Simpson weights per species (zero off that species' blocks). */
  weights: Record<Species, Float64Array>;
}

/** The contour with the given (even) number of steps on each block of the chain. */
export function contourFromSteps(chain: Chain, steps: readonly number[], field = 'cell.ns'): Contour {
  if (steps.length !== chain.blocks.length) throw new ModelError(field, steps, `allowed: one step count per block (${chain.blocks.length} blocks)`);
  const ns = steps.reduce((a, b) => a + b, 0);
  const s = new Float64Array(ns + 1);
  const weights = { A: new Float64Array(ns + 1), B: new Float64Array(ns + 1) };
  const blocks: ContourBlock[] = [];
  let offset = 0;
  chain.blocks.forEach((b, k) => {
    const n = steps[k];
    if (!Number.isInteger(n) || n < 2 || n % 2 !== 0) {
      throw new ModelError(field, n, `allowed: an even whole number ≥ 2 of contour steps on every block (block ${k + 1}, ${b.species}, fraction ${b.fraction}): Simpson's rule needs pairs of intervals`);
    }
    const h = (b.end - b.start) / n;
    for (let i = 0; i <= n; i++) {
      const idx = offset + i;
      s[idx] = i === n ? b.end : b.start + i * h;
      const c = i === 0 || i === n ? 1 : i % 2 === 1 ? 4 : 2;
      weights[b.species][idx] += (c * h) / 3;
    }
    blocks.push({ steps: n, h, start: b.start, end: b.end, offset });
    offset += n;
  });
  s[0] = 0;
  s[ns] = 1;
  return { blocks, ns, s, weights };
}

/**
 * Spread about `total` steps over the blocks in proportion to their lengths, each block's
 * count rounded to an even whole number ≥ 2: every block then has nearly the same step,
 * and any block fraction works. When every fraction × total is already an even whole
 * number, all steps are exactly 1/total (the contour of a single global step).
 */
export function contourWithTotal(chain: Chain, total: number, field = 'cell.ns'): Contour {
  if (!Number.isInteger(total) || total < 2) throw new ModelError(field, total, 'allowed: a whole number of contour steps ≥ 2 (or "auto")');
  return contourFromSteps(chain, stepsByLength(chain, total), field);
}

/** About `total` steps spread over the blocks in proportion to their lengths (each even, ≥ 2). */
function stepsByLength(chain: Chain, total: number): number[] {
  return chain.blocks.map((b) => Math.max(2, 2 * Math.round((b.fraction * total) / 2)));
}

/**
 * How a network's collocation spreads its contour steps over the blocks: 'equal' gives every
 * block `perBlock` steps (a short block is then sampled more finely than a long one);
 * 'by-length' spreads the same total, `perBlock` × blocks, in proportion to the blocks'
 * lengths (each even, ≥ 2), so every block has nearly the same step h. The networks' MDE
 * error grows with h on the long block (measured at f = 0.35, χN = 22:
 * docs/second-order-training.md).
 */
export type ContourSpread = 'equal' | 'by-length';

/** The steps on each block of the chain, in chain order, for a collocation's spread. */
export function collocationSteps(chain: Chain, perBlock: number, spread: ContourSpread): number[] {
  return spread === 'by-length' ? stepsByLength(chain, perBlock * chain.blocks.length) : chain.blocks.map(() => perBlock);
}

/**
 * The collocation contours of q (along the chain) and of q† (along the reversed chain, the
 * same steps in reverse order, so q†'s node ns − i sits at s = 1 − s_i exactly).
 */
export function collocationContours(chain: Chain, reversed: Chain, perBlock: number, spread: ContourSpread, field: string): { q: Contour; qDagger: Contour } {
  const steps = collocationSteps(chain, perBlock, spread);
  return { q: contourFromSteps(chain, steps, field), qDagger: contourFromSteps(reversed, [...steps].reverse(), field) };
}

/** The same contour read from the other chain end (the contour of q†). */
export function reversedContour(chain: Chain, contour: Contour): Contour {
  const rev = [...chain.blocks].reverse();
  const steps = [...contour.blocks].reverse().map((b) => b.steps);
  // Rebuild on the reversed block list so that node positions and weights follow it.
  let start = 0;
  const blocks = rev.map((b, i) => {
    const end = i === rev.length - 1 ? 1 : start + b.fraction;
    const out = { ...b, start, end };
    start = end;
    return out;
  });
  return contourFromSteps({ ...chain, blocks }, steps);
}

/** The block holding contour position s (a junction belongs to the block it opens). */
export function blockAt(chain: Chain, s: number): number {
  for (let k = 0; k < chain.blocks.length; k++) if (s < chain.blocks[k].end) return k;
  return chain.blocks.length - 1;
}

/**
 * φ_A and φ_B on a grid from the propagators on the contour nodes (float64; see the header):
 * q[i] = q(·, s_i), qDagger[i] = q†(·, s'_i) on the reversed chain's nodes (s'_{ns−i} = 1 − s_i).
 */
export function densitiesFromPropagators(contour: Contour, q: readonly ArrayLike<number>[], qDagger: readonly ArrayLike<number>[], Q: number): SpeciesArrays {
  const n = q[0].length;
  const ns = contour.ns;
  const phi: SpeciesArrays = { A: new Float64Array(n), B: new Float64Array(n) };
  for (let i = 0; i <= ns; i++) {
    const cA = contour.weights.A[i];
    const cB = contour.weights.B[i];
    const a = q[i];
    const b = qDagger[ns - i];
    if (cA !== 0) for (let j = 0; j < n; j++) phi.A[j] += cA * a[j] * b[j];
    if (cB !== 0) for (let j = 0; j < n; j++) phi.B[j] += cB * a[j] * b[j];
  }
  const inv = 1 / Q;
  for (let j = 0; j < n; j++) {
    phi.A[j] *= inv;
    phi.B[j] *= inv;
  }
  return phi;
}

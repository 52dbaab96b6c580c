/**
 * The fixed tensor grid on which the networks' densities are integrated: x_j = j·L/nx and,
 * on each block, `nodesPerBlock` equal Simpson intervals. Units: x in Rg, s ∈ [0, 1].
 *
 * Weights: φ_K(x) = (1/Q) Σ_i c^K_i q(x, s_i) q†(x, 1 − s_i) with c^K the composite
 * Simpson weights of the blocks of species K (a junction node takes the end weight of
 * both blocks it closes and opens, each to its own species).
 */
import type { Chain } from '../physics/chain.js';
import type { Species } from '../physics/chain-schema.js';

export interface ContourNodes {
  /** Node positions s_i, increasing, 0 and 1 included, each junction once. */
  s: Float64Array;
  /** Simpson weights per species (zero off that species' blocks). */
  weights: Record<Species, Float64Array>;
}

export function contourNodes(chain: Chain, nodesPerBlock: number): ContourNodes {
  if (nodesPerBlock % 2 !== 0 || nodesPerBlock < 2) throw new RangeError(`nodesPerBlock must be even and ≥ 2, got ${nodesPerBlock}`);
  const n = chain.blocks.length * nodesPerBlock + 1;
  const s = new Float64Array(n);
  const weights = { A: new Float64Array(n), B: new Float64Array(n) };
  chain.blocks.forEach((b, k) => {
    const h = (b.end - b.start) / nodesPerBlock;
    for (let i = 0; i <= nodesPerBlock; i++) {
      const idx = k * nodesPerBlock + i;
      s[idx] = i === nodesPerBlock ? b.end : b.start + i * h;
      const c = i === 0 || i === nodesPerBlock ? 1 : i % 2 === 1 ? 4 : 2;
      weights[b.species][idx] += (c * h) / 3;
    }
  });
  s[0] = 0;
  s[n - 1] = 1;
  return { s, weights };
}

/** The species acting at contour point s of the chain (junction points: the later block). */
export function speciesAt(chain: Chain, s: number): { species: Species; diffusivity: number } {
  for (const b of chain.blocks) if (s < b.end) return { species: b.species, diffusivity: b.diffusivity };
  const last = chain.blocks[chain.blocks.length - 1];
  return { species: last.species, diffusivity: last.diffusivity };
}

export function gridX(length: number, nx: number): Float64Array {
  return Float64Array.from({ length: nx }, (_, j) => (j * length) / nx);
}

/**
 * The polymer model, defined once for every solver (spectral, network, inverse, reports).
 *
 * Units and conventions (docs/physics.md): contour s ∈ [0, 1] from one chain end; lengths
 * in Rg of the whole chain; block K carries the Laplacian factor (b_K/b)², stored here as
 * `diffusivity`. A chain is a linear sequence of blocks; diblock, triblock and homopolymer
 * are presets that resolve to the same block list.
 */
import type { ChainSpec, Species } from './chain-schema.js';

export const SPECIES: readonly Species[] = ['A', 'B'];

export interface Block {
  species: Species;
  /** Length fraction of the chain, Σ = 1. */
  fraction: number;
  /** b_K / b. */
  segmentLength: number;
  /** Contour interval [start, end] of this block. */
  start: number;
  end: number;
  /** (b_K/b)²: the factor of ∂²/∂x² in the MDE on this block. */
  diffusivity: number;
}

export interface Chain {
  blocks: Block[];
  /** Species that occur on the chain, in the order A, B. */
  species: Species[];
  /** Total fraction of each species. */
  speciesFraction: Record<Species, number>;
  /** Contour positions of the block junctions (excluding the ends). */
  junctions: number[];
  /** True when the reversed chain equals the chain, so q† ≡ q. */
  palindromic: boolean;
  /** Human-readable label, e.g. "A0.50-B0.50". */
  label: string;
}

export class ModelError extends Error {
  constructor(
    public readonly field: string,
    public readonly value: unknown,
    public readonly allowed: string,
  ) {
    super(`${field}: got ${JSON.stringify(value)}; ${allowed}`);
    this.name = 'ModelError';
  }
}

const FRACTION_SUM_TOL = 1e-9;

interface RawBlock {
  species: Species;
  fraction: number;
  segmentLength: number;
}

function rawBlocks(spec: ChainSpec): RawBlock[] {
  switch (spec.type) {
    case 'diblock':
      return [
        { species: 'A', fraction: spec.f, segmentLength: spec.segmentRatio },
        { species: 'B', fraction: 1 - spec.f, segmentLength: 1 },
      ];
    case 'triblock': {
      const a1 = spec.f * spec.firstBlockShare;
      const a2 = spec.f - a1;
      return [
        { species: 'A', fraction: a1, segmentLength: spec.segmentRatio },
        { species: 'B', fraction: 1 - spec.f, segmentLength: 1 },
        { species: 'A', fraction: a2, segmentLength: spec.segmentRatio },
      ];
    }
    case 'homopolymer':
      return [{ species: spec.species, fraction: 1, segmentLength: spec.segmentLength }];
    case 'blocks':
      return spec.blocks.map((b) => ({ ...b }));
  }
}

/** Resolve a chain spec to the block model; adjacent blocks of one species are merged. */
export function buildChain(spec: ChainSpec): Chain {
  const raw = rawBlocks(spec);
  const total = raw.reduce((acc, b) => acc + b.fraction, 0);
  if (Math.abs(total - 1) > FRACTION_SUM_TOL) {
    throw new ModelError('system.chain.blocks', raw.map((b) => b.fraction), `block fractions must sum to 1 (sum is ${total})`);
  }
  const merged: RawBlock[] = [];
  for (const b of raw) {
    const last = merged[merged.length - 1];
    if (last && last.species === b.species && last.segmentLength === b.segmentLength) last.fraction += b.fraction;
    else merged.push({ ...b });
  }
  let s = 0;
  const blocks: Block[] = merged.map((b, i) => {
    const start = s;
    s = i === merged.length - 1 ? 1 : s + b.fraction;
    return { ...b, start, end: s, diffusivity: b.segmentLength * b.segmentLength };
  });
  const speciesFraction: Record<Species, number> = { A: 0, B: 0 };
  for (const b of blocks) speciesFraction[b.species] += b.fraction;
  const species = SPECIES.filter((k) => speciesFraction[k] > 0);
  const n = blocks.length;
  const palindromic = blocks.every((b, i) => {
    const o = blocks[n - 1 - i];
    return o.species === b.species && Math.abs(o.fraction - b.fraction) < 1e-12 && o.segmentLength === b.segmentLength;
  });
  return {
    blocks,
    species,
    speciesFraction,
    junctions: blocks.slice(0, -1).map((b) => b.end),
    palindromic,
    label: blocks.map((b) => `${b.species}${b.fraction.toFixed(3)}${b.segmentLength !== 1 ? `(b=${b.segmentLength})` : ''}`).join('-'),
  };
}

/** The same chain read from the other end: the chain that q† propagates along. */
export function reverseChain(chain: Chain): Chain {
  const rev = [...chain.blocks].reverse();
  let s = 0;
  const blocks = rev.map((b, i) => {
    const start = s;
    s = i === rev.length - 1 ? 1 : s + b.fraction;
    return { ...b, start, end: s };
  });
  return { ...chain, blocks, junctions: blocks.slice(0, -1).map((b) => b.end), label: blocks.map((b) => b.species).join('-') };
}

/** Free energy per chain of the homogeneous melt, in kT: χN φ̄_A φ̄_B (docs/physics.md). */
export function disorderedFreeEnergy(chain: Chain, chiN: number): number {
  return chiN * chain.speciesFraction.A * chain.speciesFraction.B;
}

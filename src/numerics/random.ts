/**
 * The one seeded pseudo-random generator of mesofield: network initialisation, collocation
 * points, surrogate parameter draws and the noise of synthetic profiles all draw from it,
 * so a seeded run repeats bit for bit (tfjs's own initialisers draw from an internal
 * generator we do not control).
 *
 * Generator: Marsaglia's xorshift128 ("Xorshift RNGs", J. Stat. Softw. 8(14), 2003: the
 * xor128 routine, shifts 11, 8, 19), period 2^128 − 1. The 128-bit state is filled from
 * the 32-bit seed by the linear congruential generator x ← 1664525·x + 1013904223 mod 2^32
 * (Press et al., Numerical Recipes, 2nd ed., §7.1 "quick and dirty" generator), which
 * never leaves the state all zero for four consecutive outputs.
 *
 * Normal deviates: the Box–Muller transform (Box & Muller, Ann. Math. Stat. 29, 610 (1958)),
 * z = sqrt(−2 ln u1) cos(2π u2), with the paired sine value kept for the next call.
 */

export class Xorshift128 {
  private x: number;
  private y: number;
  private z: number;
  private w: number;

  constructor(seed: number) {
    if (!Number.isInteger(seed) || seed < 0 || seed > 0xffffffff) throw new RangeError(`seed must be an integer in [0, 2^32 − 1], got ${seed}`);
    let s = seed >>> 0;
    const next = () => (s = (Math.imul(s, 1664525) + 1013904223) >>> 0);
    this.x = next();
    this.y = next();
    this.z = next();
    this.w = next();
    // Discard a few outputs so nearby seeds decorrelate (common practice, no source).
    for (let i = 0; i < 16; i++) this.nextUint32();
  }

  /** xor128: t = x ^ (x << 11); x,y,z ← y,z,w; w = (w ^ (w >>> 19)) ^ (t ^ (t >>> 8)). */
  nextUint32(): number {
    const t = (this.x ^ (this.x << 11)) >>> 0;
    this.x = this.y;
    this.y = this.z;
    this.z = this.w;
    this.w = (this.w ^ (this.w >>> 19) ^ (t ^ (t >>> 8))) >>> 0;
    return this.w;
  }

  /** Uniform on [0, 1) with 53 random bits (two outputs). */
  next(): number {
    const hi = this.nextUint32() >>> 5; // 27 bits
    const lo = this.nextUint32() >>> 6; // 26 bits
    return (hi * 67108864 + lo) / 9007199254740992;
  }
}

/** A child seed for sub-network k of a network seeded with `seed` (distinct, reproducible). */
export function childSeed(seed: number, k: number): number {
  // One LCG step of (seed + golden-ratio multiple of k): distinct for distinct k (common practice, no source).
  return (Math.imul((seed + Math.imul(k + 1, 0x9e3779b9)) >>> 0, 1664525) + 1013904223) >>> 0;
}

/** Standard normal deviates from a seeded Xorshift128 (Box–Muller, see the header). */
export class GaussianNoise {
  private readonly uniform: Xorshift128;
  private spare: number | undefined;

  constructor(seed: number) {
    this.uniform = new Xorshift128(seed);
  }

  /** One standard normal deviate. */
  next(): number {
    if (this.spare !== undefined) {
      const s = this.spare;
      this.spare = undefined;
      return s;
    }
    // u1 in (0, 1]: ln(u1) stays finite.
    const u1 = 1 - this.uniform.next();
    const u2 = this.uniform.next();
    const r = Math.sqrt(-2 * Math.log(u1));
    this.spare = r * Math.sin(2 * Math.PI * u2);
    return r * Math.cos(2 * Math.PI * u2);
  }
}

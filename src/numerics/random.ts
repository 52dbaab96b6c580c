/**
 * Seeded pseudo-random numbers for network initialisation, so that a seeded run repeats
 * bit for bit (tfjs's own initialisers draw from an internal generator we do not control).
 *
 * Generator: Marsaglia's xorshift128 ("Xorshift RNGs", J. Stat. Softw. 8(14), 2003: the
 * xor128 routine, shifts 11, 8, 19), period 2^128 − 1. The 128-bit state is filled from
 * the 32-bit seed by the linear congruential generator x ← 1664525·x + 1013904223 mod 2^32
 * (Press et al., Numerical Recipes, 2nd ed., §7.1 "quick and dirty" generator), which
 * never leaves the state all zero for four consecutive outputs.
 *
 * Initialisation: Glorot & Bengio (AISTATS 2010, eq. 16) uniform, W ~ U(−a, a) with
 * a = sqrt(6 / (fan_in + fan_out)); biases start at zero.
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

/** Glorot-uniform kernel [fanIn, fanOut], row-major. */
export function glorotUniform(rng: Xorshift128, fanIn: number, fanOut: number): Float64Array {
  const a = Math.sqrt(6 / (fanIn + fanOut));
  const w = new Float64Array(fanIn * fanOut);
  for (let i = 0; i < w.length; i++) w[i] = (2 * rng.next() - 1) * a;
  return w;
}

/**
 * Seeded Gaussian noise for synthetic profiles: a seeded run repeats bit for bit.
 *
 * Uniforms: mulberry32 (Tommy Ettinger's 32-bit generator, public domain; period 2^32),
 * two outputs per double for 53 random bits. Normals: the Box–Muller transform
 * (Box & Muller, Ann. Math. Stat. 29, 610 (1958)), z = sqrt(−2 ln u1) cos(2π u2), with
 * the paired sine value kept for the next call.
 */

export class Mulberry32 {
  private state: number;

  constructor(seed: number) {
    if (!Number.isInteger(seed) || seed < 0 || seed > 0xffffffff) throw new RangeError(`seed must be an integer in [0, 2^32 − 1], got ${seed}`);
    this.state = seed >>> 0;
  }

  nextUint32(): number {
    this.state = (this.state + 0x6d2b79f5) >>> 0;
    let t = this.state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return (t ^ (t >>> 14)) >>> 0;
  }

  /** Uniform on [0, 1) with 53 random bits. */
  next(): number {
    const hi = this.nextUint32() >>> 5;
    const lo = this.nextUint32() >>> 6;
    return (hi * 67108864 + lo) / 9007199254740992;
  }
}

export class GaussianNoise {
  private readonly uniform: Mulberry32;
  private spare: number | undefined;

  constructor(seed: number) {
    this.uniform = new Mulberry32(seed);
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

/**
 * Random-phase approximation for a melt of linear A/B block chains (Leibler,
 * Macromolecules 13, 1602 (1980); docs/physics.md, "Weak and strong segregation").
 *
 * Units: x = (q Rg)², Rg of the whole chain with the reference segment length; block K
 * has mean-square extension per unit contour (b_K/b)², so its decay rate is y = x (b_K/b)².
 * Single-chain correlations, normalised per chain (contour fractions):
 *   same block of length h:  ∫∫ e^{−y|s−s'|} = 2 (y h + e^{−y h} − 1) / y²
 *   blocks i < j:            e^{−x Σ_between D_k h_k} (1 − e^{−y_i h_i})(1 − e^{−y_j h_j}) / (y_i y_j)
 * and N/S(q) = (S_AA + S_BB + 2 S_AB)/(S_AA S_BB − S_AB²) − 2χN.
 * For a diblock these reduce to the notes' g(f, x), g(1−f, x) and [g(1,x) − g(f,x) − g(1−f,x)]/2.
 */
import type { Chain } from './chain.js';
import { ModelError } from './chain.js';

/** 2(yh + e^{−yh} − 1)/y², with a series where cancellation would lose digits. */
export function debyeBlock(h: number, y: number): number {
  const z = y * h;
  if (Math.abs(z) < 1e-3) {
    // 2(z + e^{−z} − 1)/z² = 1 − z/3 + z²/12 − z³/60 + …, times h².
    return h * h * (1 - z / 3 + (z * z) / 12 - (z * z * z) / 60);
  }
  return (2 * (z + Math.expm1(-z))) / (y * y);
}

/** (1 − e^{−y h})/y, stable at small y. */
function endFactor(h: number, y: number): number {
  const z = y * h;
  if (Math.abs(z) < 1e-8) return h * (1 - z / 2);
  return -Math.expm1(-z) / y;
}

export interface Correlations {
  AA: number;
  BB: number;
  AB: number;
}

export function correlations(chain: Chain, x: number): Correlations {
  const out: Correlations = { AA: 0, BB: 0, AB: 0 };
  const bl = chain.blocks;
  for (let i = 0; i < bl.length; i++) {
    const yi = x * bl[i].diffusivity;
    const self = debyeBlock(bl[i].fraction, yi);
    if (bl[i].species === 'A') out.AA += self;
    else out.BB += self;
    let between = 0;
    for (let j = i + 1; j < bl.length; j++) {
      const yj = x * bl[j].diffusivity;
      const c = Math.exp(-x * between) * endFactor(bl[i].fraction, yi) * endFactor(bl[j].fraction, yj);
      between += bl[j].diffusivity * bl[j].fraction;
      // Each unordered pair appears twice in the double integral over s and s'.
      if (bl[i].species === bl[j].species) {
        if (bl[i].species === 'A') out.AA += 2 * c;
        else out.BB += 2 * c;
      } else out.AB += c;
    }
  }
  return out;
}

/** N / S(q) at x = (q Rg)². */
export function inverseStructureFactor(chain: Chain, chiN: number, x: number): number {
  const c = correlations(chain, x);
  return (c.AA + c.BB + 2 * c.AB) / (c.AA * c.BB - c.AB * c.AB) - 2 * chiN;
}

/**
 * S(q)/N of the disordered melt at x = (q Rg)²: the scattering function per chain in units of
 * the chain's own volume (the quantity the scattering fits scale by a contrast factor).
 * Defined only below the spinodal, where N/S(q) > 0 for every q.
 */
export function structureFactorPerChain(chain: Chain, chiN: number, x: number): number {
  return 1 / inverseStructureFactor(chain, chiN, x);
}

/**
 * N/S(q) at χN = 0: the χN-independent part G(x) of N/S = G(x) − 2χN (Leibler 1980). Its
 * minimum fixes the peak position q*Rg for every χN, and a fit that varies only χN can
 * reuse it.
 */
export function inverseStructureFactorAtZeroChi(chain: Chain, x: number): number {
  return inverseStructureFactor(chain, 0, x);
}

export interface Spinodal {
  /** (χN)_s: where the minimum over q of N/S(q) reaches zero. */
  chiN: number;
  /** q* Rg at the spinodal. */
  qRg: number;
  /** 2π/q*, in Rg: the lamellar period at the transition. */
  period: number;
}

/** Golden-section minimum of a unimodal function on [a, b]. */
function goldenMinimum(fn: (t: number) => number, a: number, b: number, tol: number): number {
  const g = (Math.sqrt(5) - 1) / 2;
  let c = b - g * (b - a);
  let d = a + g * (b - a);
  let fc = fn(c);
  let fd = fn(d);
  while (b - a > tol * (Math.abs(c) + Math.abs(d) + 1e-300)) {
    if (fc < fd) {
      b = d;
      d = c;
      fd = fc;
      c = b - g * (b - a);
      fc = fn(c);
    } else {
      a = c;
      c = d;
      fc = fd;
      d = a + g * (b - a);
      fd = fn(d);
    }
  }
  return 0.5 * (a + b);
}

/**
 * The spinodal of the disordered melt. (χN)_s = min over x of ½(S_AA + S_BB + 2S_AB)/det;
 * found by a log-spaced scan over x = (qRg)² then golden section in ln x.
 */
export function spinodal(chain: Chain): Spinodal {
  if (chain.species.length < 2) {
    throw new ModelError('system.chain', chain.label, 'the RPA spinodal needs a chain with both A and B blocks');
  }
  const half = (x: number) => inverseStructureFactor(chain, 0, x) / 2;
  let best = Infinity;
  let bestI = 0;
  const lo = -4;
  const hi = 4;
  const n = 400;
  const at = (i: number) => Math.pow(10, lo + ((hi - lo) * i) / n);
  for (let i = 0; i <= n; i++) {
    const v = half(at(i));
    if (v < best) {
      best = v;
      bestI = i;
    }
  }
  if (bestI === 0 || bestI === n) {
    throw new ModelError('system.chain', chain.label, 'no finite-q instability found for this chain (macrophase separation?)');
  }
  const ln = goldenMinimum((t) => half(Math.exp(t)), Math.log(at(bestI - 1)), Math.log(at(bestI + 1)), 1e-13);
  const x = Math.exp(ln);
  const qRg = Math.sqrt(x);
  return { chiN: half(x), qRg, period: (2 * Math.PI) / qRg };
}

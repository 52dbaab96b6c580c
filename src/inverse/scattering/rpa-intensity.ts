/**
 * The forward model of a disordered-melt scattering fit:
 *
 *   I(q) = K · [S/N](q; χN, Rg) ⊛ R(q) + bg
 *
 * with S/N Leibler's RPA structure factor per chain (physics/rpa.ts, the one place it is
 * computed), at x = (q Rg)², and R a Gaussian q resolution of standard deviation σ_q.
 *
 * Units: q and σ_q in nm⁻¹, Rg in nm (Rg of the whole chain with the reference segment
 * length b = b_B, as in docs/physics.md); K and bg in the units of I.
 *
 * N/S = G(x) − 2χN with G independent of χN (Leibler 1980), so the model keeps G at its
 * quadrature nodes for the last Rg and a new χN costs one division per node.
 *
 * Resolution: the convolution ∫ I(q′) g(q′ − q; σ_q) dq′ by the trapezoid rule on 41 nodes
 * over ±5σ_q (the rule converges geometrically for a smooth integrand against a Gaussian;
 * common practice, no source), nodes with q′ ≤ 0 dropped and the weights renormalised.
 *
 * K and bg enter linearly: for each (χN, Rg) they are the weighted linear least-squares
 * solution (variable projection, Golub & Pereyra, SIAM J. Numer. Anal. 10, 413 (1973)),
 * so the nonlinear search runs over χN and Rg only.
 */
import type { Chain } from '../../physics/chain.js';
import { inverseStructureFactorAtZeroChi } from '../../physics/rpa.js';

const NODES = 41;
const HALF_WIDTH = 5;

export interface LinearFit {
  /** Contrast factor K (units of I per unit S/N). */
  K: number;
  background: number;
  /** Weighted residual sum of squares Σ w (I − model)². */
  rss: number;
}

export class RpaIntensity {
  private readonly nodeQ: Float64Array[];
  private readonly nodeW: Float64Array[];
  private cachedRg = Number.NaN;
  private cachedG: Float64Array[] = [];

  constructor(
    readonly chain: Chain,
    /** Data positions, nm⁻¹. */
    readonly q: Float64Array,
    /** Gaussian resolution (standard deviation), nm⁻¹; 0 for none. */
    readonly resolution: number,
  ) {
    this.nodeQ = [];
    this.nodeW = [];
    for (const qi of q) {
      if (!(resolution > 0)) {
        this.nodeQ.push(Float64Array.of(qi));
        this.nodeW.push(Float64Array.of(1));
        continue;
      }
      const qs: number[] = [];
      const ws: number[] = [];
      for (let k = 0; k < NODES; k++) {
        const t = -HALF_WIDTH + (2 * HALF_WIDTH * k) / (NODES - 1);
        const qq = qi + t * resolution;
        if (qq <= 0) continue;
        qs.push(qq);
        ws.push(Math.exp(-0.5 * t * t) * (k === 0 || k === NODES - 1 ? 0.5 : 1));
      }
      const sum = ws.reduce((a, b) => a + b, 0);
      this.nodeQ.push(Float64Array.from(qs));
      this.nodeW.push(Float64Array.from(ws.map((w) => w / sum)));
    }
  }

  private g(rg: number): Float64Array[] {
    if (rg !== this.cachedRg) {
      this.cachedG = this.nodeQ.map((qs) => qs.map((qq) => inverseStructureFactorAtZeroChi(this.chain, (qq * rg) ** 2)));
      this.cachedRg = rg;
    }
    return this.cachedG;
  }

  /** The resolution-smeared S/N at the data positions; null when χN reaches the spinodal at some node. */
  shape(chiN: number, rg: number, out = new Float64Array(this.q.length)): Float64Array | null {
    const G = this.g(rg);
    for (let i = 0; i < G.length; i++) {
      let s = 0;
      const gi = G[i];
      const wi = this.nodeW[i];
      for (let k = 0; k < gi.length; k++) {
        const d = gi[k] - 2 * chiN;
        if (!(d > 0)) return null;
        s += wi[k] / d;
      }
      out[i] = s;
    }
    return out;
  }
}

/** Weighted least squares of I ≈ K s + bg (2 × 2 normal equations). */
export function linearFit(s: Float64Array, I: Float64Array, w: Float64Array): LinearFit {
  let sw = 0;
  let ss = 0;
  let sss = 0;
  let si = 0;
  let ssi = 0;
  for (let i = 0; i < s.length; i++) {
    sw += w[i];
    ss += w[i] * s[i];
    sss += w[i] * s[i] * s[i];
    si += w[i] * I[i];
    ssi += w[i] * s[i] * I[i];
  }
  const det = sss * sw - ss * ss;
  const K = (ssi * sw - ss * si) / det;
  const background = (sss * si - ss * ssi) / det;
  let rss = 0;
  for (let i = 0; i < s.length; i++) {
    const r = I[i] - K * s[i] - background;
    rss += w[i] * r * r;
  }
  return { K, background, rss };
}

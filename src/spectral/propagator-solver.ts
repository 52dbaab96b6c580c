/**
 * Pseudo-spectral solution of the modified diffusion equation (docs/physics.md)
 *   ∂q/∂s = D_K ∂²q/∂x² − w_K(x) q,   q(x, 0) = 1,   D_K = (b_K/b)²,
 * for both propagators of a linear block chain in any cell (the cell supplies the diffusion
 * step with its boundary condition), and the densities they give.
 *
 * Units: x in Rg, s ∈ [0, 1], w in kT per chain.
 * Method: symmetric (Strang) operator splitting over a step h,
 *   q ← e^{−w h/2} · S[ e^{−k² D h} ] · ( e^{−w h/2} q ),
 * with S the cell's spectral diffusion step; second order in h. With Richardson extrapolation
 * q = (4 q_{h/2,h/2} − q_h)/3 it is fourth order (Ranjan, Qin & Morse, Macromolecules 41, 942
 * (2008)). Each block takes its own step h_b (physics/contour.ts); the densities use the one
 * contour quadrature of physics/contour.ts.
 */
import type { Chain } from '../physics/chain.js';
import type { Cell, DiffusionStep } from '../physics/cell/cell.js';
import type { Contour } from '../physics/contour.js';
import { densitiesFromPropagators } from '../physics/contour.js';
import type { SpeciesArrays } from '../physics/fields.js';

interface BlockStep {
  /** e^{−w h/2}, e^{−w h/4} on the grid. */
  half: Float64Array;
  quarter: Float64Array;
  /** e^{−k² D h}, e^{−k² D h/2} on the spectral modes. */
  diffuseFull: Float64Array;
  diffuseHalf: Float64Array;
}

export interface PropagatorOptions {
  /** Richardson extrapolation (fourth order). Off only for convergence-order checks. */
  richardson: boolean;
}

export interface ChainDensities {
  phi: SpeciesArrays;
  Q: number;
  QDagger: number;
  /** q[i] = q(·, s_i), i = 0..ns. */
  q: Float64Array[];
  qDagger: Float64Array[];
}

export class PropagatorSolver {
  private readonly diffusion: DiffusionStep;
  private readonly q: Float64Array[];
  private readonly qDagger: Float64Array[];
  private readonly scratchFull: Float64Array;
  private readonly scratchHalf: Float64Array;
  private steps: BlockStep[] = [];
  private readonly diffuseCache = new Map<string, [Float64Array, Float64Array]>();
  /** Count of single-chain propagations done (for benchmarks). */
  propagations = 0;

  constructor(
    readonly chain: Chain,
    readonly cell: Cell,
    readonly contour: Contour,
    readonly options: PropagatorOptions = { richardson: true },
  ) {
    this.diffusion = cell.diffusion();
    const alloc = () => Array.from({ length: contour.ns + 1 }, () => new Float64Array(cell.n));
    this.q = alloc();
    this.qDagger = chain.palindromic ? this.q : alloc();
    this.scratchFull = new Float64Array(cell.n);
    this.scratchHalf = new Float64Array(cell.n);
  }

  private diffuseFor(diffusivity: number, h: number): [Float64Array, Float64Array] {
    const key = `${diffusivity}:${h}`;
    let d = this.diffuseCache.get(key);
    if (!d) {
      d = [this.diffusion.multiplier(diffusivity, h), this.diffusion.multiplier(diffusivity, h / 2)];
      this.diffuseCache.set(key, d);
    }
    return d;
  }

  /** Precompute the per-block step factors for these species fields. */
  setFields(w: SpeciesArrays): void {
    const n = this.cell.n;
    const byKey = new Map<string, BlockStep>();
    this.steps = this.chain.blocks.map((b, k) => {
      const h = this.contour.blocks[k].h;
      const key = `${b.species}:${b.diffusivity}:${h}`;
      let st = byKey.get(key);
      if (!st) {
        const wk = w[b.species];
        const half = new Float64Array(n);
        const quarter = new Float64Array(n);
        for (let j = 0; j < n; j++) {
          half[j] = Math.exp(-wk[j] * h * 0.5);
          quarter[j] = Math.exp(-wk[j] * h * 0.25);
        }
        const [diffuseFull, diffuseHalf] = this.diffuseFor(b.diffusivity, h);
        st = { half, quarter, diffuseFull, diffuseHalf };
        byKey.set(key, st);
      }
      return st;
    });
  }

  /** One contour step from src into dst (may alias scratch, not src). */
  private step(src: Float64Array, dst: Float64Array, st: BlockStep): void {
    const n = this.cell.n;
    const full = this.scratchFull;
    for (let j = 0; j < n; j++) full[j] = st.half[j] * src[j];
    if (!this.options.richardson) {
      this.diffusion.apply(full, st.diffuseFull);
      for (let j = 0; j < n; j++) dst[j] = st.half[j] * full[j];
      return;
    }
    // The full step and the first half step are independent: one transform pair for both.
    const hf = this.scratchHalf;
    for (let j = 0; j < n; j++) hf[j] = st.quarter[j] * src[j];
    this.diffusion.applyPair(full, st.diffuseFull, hf, st.diffuseHalf);
    // e^{−w h/4} closing the first half step times the one opening the second = e^{−w h/2}.
    for (let j = 0; j < n; j++) hf[j] *= st.half[j];
    this.diffusion.apply(hf, st.diffuseHalf);
    for (let j = 0; j < n; j++) {
      const qh = st.half[j] * full[j];
      const qh2 = st.quarter[j] * hf[j];
      dst[j] = (4 * qh2 - qh) / 3;
    }
  }

  /** Propagate from q(·,0) = 1 through the chain's blocks in the given order. */
  private propagate(out: Float64Array[], blockOrder: number[]): void {
    out[0].fill(1);
    let i = 0;
    for (const b of blockOrder) {
      const st = this.steps[b];
      const n = this.contour.blocks[b].steps;
      for (let k = 0; k < n; k++, i++) this.step(out[i], out[i + 1], st);
    }
    this.propagations++;
  }

  /** Solve both propagators in the current fields and integrate the densities. */
  solve(): ChainDensities {
    const order = this.chain.blocks.map((_, b) => b);
    this.propagate(this.q, order);
    if (!this.chain.palindromic) this.propagate(this.qDagger, order.reverse());
    const ns = this.contour.ns;
    const Q = this.cell.mean(this.q[ns]);
    const QDagger = this.cell.mean(this.qDagger[ns]);
    const phi = densitiesFromPropagators(this.contour, this.q, this.qDagger, Q);
    return { phi, Q, QDagger, q: this.q, qDagger: this.qDagger };
  }
}

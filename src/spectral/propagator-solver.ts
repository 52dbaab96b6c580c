/**
 * Pseudo-spectral solution of the modified diffusion equation (SCFT-NOTES.md)
 *   ∂q/∂s = D_K ∂²q/∂x² − w_K(x) q,   q(x, 0) = 1,   D_K = (b_K/b)²,
 * for both propagators of a linear block chain, and the densities they give.
 *
 * Units: x in Rg, s ∈ [0, 1], w in kT per chain.
 * Method: symmetric (Strang) operator splitting over a step h,
 *   q ← e^{−w h/2} · F⁻¹[ e^{−k² D h} · F( e^{−w h/2} q ) ],
 * second order in h; with Richardson extrapolation q = (4 q_{h/2,h/2} − q_h)/3 it is
 * fourth order (Ranjan, Qin & Morse, Macromolecules 41, 942 (2008)). Contour integrals
 * use Simpson's rule on each block, which is why each block holds an even step count.
 */
import type { Chain, ContourGrid } from '../physics/chain.js';
import type { SpeciesArrays } from '../physics/fields.js';
import { cellMean } from '../physics/grid.js';
import type { Cell } from '../physics/grid.js';
import { DiffusionOperator } from './diffusion-operator.js';

interface BlockStep {
  /** e^{−w h/2}, e^{−w h/4} on the grid. */
  half: Float64Array;
  quarter: Float64Array;
  /** e^{−k² D h}, e^{−k² D h/2} on the Fourier modes. */
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
  private readonly diffusion: DiffusionOperator;
  private readonly q: Float64Array[];
  private readonly qDagger: Float64Array[];
  private readonly scratchFull: Float64Array;
  private readonly scratchHalf: Float64Array;
  private steps: BlockStep[] = [];
  private readonly diffuseCache = new Map<number, [Float64Array, Float64Array]>();
  /** Count of single-chain propagations done (for benchmarks). */
  propagations = 0;

  constructor(
    readonly chain: Chain,
    readonly cell: Cell,
    readonly contour: ContourGrid,
    readonly options: PropagatorOptions = { richardson: true },
  ) {
    this.diffusion = new DiffusionOperator(cell.nx, cell.length);
    const alloc = () => Array.from({ length: contour.ns + 1 }, () => new Float64Array(cell.nx));
    this.q = alloc();
    this.qDagger = chain.palindromic ? this.q : alloc();
    this.scratchFull = new Float64Array(cell.nx);
    this.scratchHalf = new Float64Array(cell.nx);
  }

  private diffuseFor(diffusivity: number): [Float64Array, Float64Array] {
    let d = this.diffuseCache.get(diffusivity);
    if (!d) {
      const h = this.contour.ds;
      d = [this.diffusion.multiplier(diffusivity, h), this.diffusion.multiplier(diffusivity, h / 2)];
      this.diffuseCache.set(diffusivity, d);
    }
    return d;
  }

  /** Precompute the per-block step factors for these species fields. */
  setFields(w: SpeciesArrays): void {
    const h = this.contour.ds;
    const nx = this.cell.nx;
    const bySpeciesAndD = new Map<string, BlockStep>();
    this.steps = this.chain.blocks.map((b) => {
      const key = `${b.species}:${b.diffusivity}`;
      let st = bySpeciesAndD.get(key);
      if (!st) {
        const wk = w[b.species];
        const half = new Float64Array(nx);
        const quarter = new Float64Array(nx);
        for (let j = 0; j < nx; j++) {
          half[j] = Math.exp(-wk[j] * h * 0.5);
          quarter[j] = Math.exp(-wk[j] * h * 0.25);
        }
        const [diffuseFull, diffuseHalf] = this.diffuseFor(b.diffusivity);
        st = { half, quarter, diffuseFull, diffuseHalf };
        bySpeciesAndD.set(key, st);
      }
      return st;
    });
  }

  /** One contour step of length h from src into dst (may alias scratch, not src). */
  private step(src: Float64Array, dst: Float64Array, st: BlockStep): void {
    const nx = this.cell.nx;
    const full = this.scratchFull;
    for (let j = 0; j < nx; j++) full[j] = st.half[j] * src[j];
    this.diffusion.apply(full, st.diffuseFull);
    if (!this.options.richardson) {
      for (let j = 0; j < nx; j++) dst[j] = st.half[j] * full[j];
      return;
    }
    const hf = this.scratchHalf;
    for (let j = 0; j < nx; j++) hf[j] = st.quarter[j] * src[j];
    this.diffusion.apply(hf, st.diffuseHalf);
    // e^{−w h/4} closing the first half step times the one opening the second = e^{−w h/2}.
    for (let j = 0; j < nx; j++) hf[j] *= st.half[j];
    this.diffusion.apply(hf, st.diffuseHalf);
    for (let j = 0; j < nx; j++) {
      const qh = st.half[j] * full[j];
      const qh2 = st.quarter[j] * hf[j];
      dst[j] = (4 * qh2 - qh) / 3;
    }
  }

  /** Propagate from q(·,0) = 1 through the original chain's blocks in the given order. */
  private propagate(out: Float64Array[], blockOrder: number[]): void {
    out[0].fill(1);
    let i = 0;
    for (const b of blockOrder) {
      const st = this.steps[b];
      const n = this.contour.stepsPerBlock[b];
      for (let k = 0; k < n; k++, i++) this.step(out[i], out[i + 1], st);
    }
    this.propagations++;
  }

  /** Solve both propagators in the current fields and integrate the densities. */
  solve(): ChainDensities {
    const nb = this.chain.blocks.length;
    const order = this.chain.blocks.map((_, b) => b);
    this.propagate(this.q, order);
    if (!this.chain.palindromic) this.propagate(this.qDagger, order.reverse());
    const ns = this.contour.ns;
    const Q = cellMean(this.q[ns]);
    const QDagger = cellMean(this.qDagger[ns]);
    const nx = this.cell.nx;
    const phi: SpeciesArrays = { A: new Float64Array(nx), B: new Float64Array(nx) };
    const ds = this.contour.ds;
    for (let b = 0; b < nb; b++) {
      const target = phi[this.chain.blocks[b].species];
      const i0 = this.contour.blockOffset[b];
      const n = this.contour.stepsPerBlock[b];
      for (let k = 0; k <= n; k++) {
        const weight = (k === 0 || k === n ? 1 : k % 2 === 1 ? 4 : 2) * (ds / 3);
        const qa = this.q[i0 + k];
        const qb = this.qDagger[ns - i0 - k];
        for (let j = 0; j < nx; j++) target[j] += weight * qa[j] * qb[j];
      }
    }
    const invQ = 1 / Q;
    for (let j = 0; j < nx; j++) {
      phi.A[j] *= invQ;
      phi.B[j] *= invQ;
    }
    return { phi, Q, QDagger, q: this.q, qDagger: this.qDagger };
  }
}

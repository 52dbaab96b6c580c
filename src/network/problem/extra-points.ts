/**
 * Extra MDE points on top of the tensor grid, per propagator: half uniform and half where
 * the residual is largest (residual-based adaptive refinement; Lu, Meng, Mao & Karniadakis,
 * SIAM Review 63, 208 (2021)), redrawn at every resampling from a seed derived from the
 * resampling's index, so a resumed run draws the same points. The residual half is the
 * `residualShare` largest |r| among four times as many uniform candidates.
 * Units: x ∈ [0, L) in Rg, s ∈ [0, 1).
 */
import type { Xorshift128 } from '../../numerics/random.js';
import type { PointSet } from './point-set.js';

/** Point coordinates as a checkpoint stores them. */
export interface Coordinates {
  x: number[];
  s: number[];
}

/** The extra points of both propagators, as saved in checkpoints so that a resume is exact. */
export interface ExtraCoordinates {
  q: Coordinates;
  qDagger: Coordinates;
}

/**
 * Draw `count` points: the uniform ones first, then the residual-picked ones (by |r| from
 * `score`, largest first, ties by draw order). Uniform draws come in (x, s) pairs.
 */
export function drawPoints(rng: Xorshift128, length: number, count: number, residualShare: number, score: (x: Float64Array, s: Float64Array) => Float32Array): { x: Float64Array; s: Float64Array } {
  const nResidual = Math.round(count * residualShare);
  const nUniform = count - nResidual;
  const pool = 4 * nResidual;
  const xs = new Float64Array(nUniform + pool);
  const ss = new Float64Array(nUniform + pool);
  for (let i = 0; i < xs.length; i++) {
    xs[i] = rng.next() * length;
    ss[i] = rng.next();
  }
  if (nResidual === 0) return { x: xs, s: ss };
  const r = score(xs.subarray(nUniform), ss.subarray(nUniform));
  const order = Array.from(r.keys()).sort((a, b) => r[b] - r[a] || a - b);
  const x = new Float64Array(count);
  const s = new Float64Array(count);
  x.set(xs.subarray(0, nUniform));
  s.set(ss.subarray(0, nUniform));
  for (let k = 0; k < nResidual; k++) {
    x[nUniform + k] = xs[nUniform + order[k]];
    s[nUniform + k] = ss[nUniform + order[k]];
  }
  return { x, s };
}

/** The current extra point sets and the index of the resampling that drew them. */
export class ExtraPoints {
  q: PointSet | null = null;
  qDagger: PointSet | null = null;
  /** Index of the current resampling (−1: none drawn yet). */
  index = -1;

  /** Both sets, or null when there are none. */
  current(): { q: PointSet; qDagger: PointSet } | null {
    return this.q && this.qDagger ? { q: this.q, qDagger: this.qDagger } : null;
  }

  /** Put new sets in place (null: none); the old ones are disposed. */
  replace(sets: { q: PointSet; qDagger: PointSet } | null, index: number): void {
    this.dispose();
    this.q = sets?.q ?? null;
    this.qDagger = sets?.qDagger ?? null;
    this.index = index;
  }

  coordinates(): ExtraCoordinates | null {
    const sets = this.current();
    if (!sets) return null;
    const grab = (p: PointSet) => ({ x: Array.from(p.x), s: Array.from(p.s) });
    return { q: grab(sets.q), qDagger: grab(sets.qDagger) };
  }

  dispose(): void {
    this.q?.dispose();
    this.qDagger?.dispose();
    this.q = null;
    this.qDagger = null;
  }
}

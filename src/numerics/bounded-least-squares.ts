/**
 * Bounded nonlinear least squares: minimise Σ r_i(p)² over a box lo ≤ p ≤ hi by the
 * Levenberg–Marquardt method (Levenberg, Q. Appl. Math. 2, 164 (1944); Marquardt, J. SIAM 11,
 * 431 (1963)) with Nielsen's damping update (Nielsen, "Damping parameter in Marquardt's
 * method", IMM-REP-1999-05, DTU (1999)): after a step with gain ratio ρ > 0,
 * μ ← μ·max(1/3, 1 − (2ρ − 1)³) and ν = 2; after a rejected step μ ← μ·ν, ν ← 2ν.
 *
 * Bounds by projection with an active set (common practice, no source): a parameter at a bound
 * whose gradient pushes it outward is held there for the step, and every trial point is
 * clipped into the box. The Jacobian is by forward differences with a step per parameter
 * (given by the caller, in the parameter's own units), or supplied by the caller.
 * Scaling: the damping term is μ·diag(JᵀJ) (Marquardt's scale invariance), floored so that a
 * parameter that does not move the residuals still gets a finite step.
 * No physics in here; residuals are whatever the caller returns (already divided by σ).
 */
import { solveDense } from './dense-solve.js';

export interface BoundedLsqOptions {
  lower: ArrayLike<number>;
  upper: ArrayLike<number>;
  /** Forward-difference step of each parameter (its units). */
  steps: ArrayLike<number>;
  maxIterations?: number;
  /** Stop when the relative decrease of the sum of squares in an accepted step is below this. */
  relTol?: number;
  /** Stop when every |δp_i| is below this fraction of its difference step. */
  stepTol?: number;
  /** Stop when an accepted step lowers the sum of squares by less than this (absolute). */
  absTol?: number;
  /** Columns computed by the caller instead of forward differences (null: difference that column). */
  jacobian?: (p: Float64Array, r: Float64Array) => (Float64Array | null)[];
  onIteration?: (it: { iteration: number; cost: number; p: Float64Array; mu: number }) => void;
}

export interface BoundedLsqResult {
  p: Float64Array;
  residuals: Float64Array;
  /** Σ r², at p. */
  cost: number;
  iterations: number;
  evaluations: number;
  /** The Jacobian at p (columns), for curvature-based estimates. */
  jacobian: Float64Array[];
  /** Parameters that end on a bound. */
  atBound: boolean[];
  converged: boolean;
}

const sumSq = (r: Float64Array) => {
  let s = 0;
  for (const v of r) s += v * v;
  return s;
};

export function boundedLeastSquares(residuals: (p: Float64Array) => Float64Array, p0: ArrayLike<number>, o: BoundedLsqOptions): BoundedLsqResult {
  const n = p0.length;
  const lo = Float64Array.from(o.lower);
  const hi = Float64Array.from(o.upper);
  const clip = (p: Float64Array) => p.map((v, i) => Math.min(hi[i], Math.max(lo[i], v)));
  const maxIt = o.maxIterations ?? 50;
  const relTol = o.relTol ?? 1e-8;
  const stepTol = o.stepTol ?? 1e-3;
  let evaluations = 0;
  const f = (p: Float64Array) => {
    evaluations++;
    return residuals(p);
  };
  let p = clip(Float64Array.from(p0));
  let r = f(p);
  let cost = sumSq(r);
  const jac = (p: Float64Array, r: Float64Array): Float64Array[] => {
    const given = o.jacobian?.(p, r) ?? [];
    return Array.from({ length: n }, (_, j) => {
      if (given[j]) return given[j]!;
      // Step inward when the forward step would leave the box.
      let h = o.steps[j];
      if (p[j] + h > hi[j]) h = -h;
      const q = Float64Array.from(p);
      q[j] += h;
      const rq = f(q);
      return rq.map((v, i) => (v - r[i]) / h);
    });
  };
  let J = jac(p, r);
  let mu = -1;
  let nu = 2;
  let converged = false;
  let it = 0;
  for (; it < maxIt; it++) {
    const g = new Float64Array(n);
    const A = Array.from({ length: n }, () => new Float64Array(n));
    for (let a = 0; a < n; a++) {
      for (let i = 0; i < r.length; i++) g[a] += J[a][i] * r[i];
      for (let b = 0; b <= a; b++) {
        let s = 0;
        for (let i = 0; i < r.length; i++) s += J[a][i] * J[b][i];
        A[a][b] = s;
        A[b][a] = s;
      }
    }
    let maxDiag = 0;
    for (let a = 0; a < n; a++) maxDiag = Math.max(maxDiag, A[a][a]);
    if (mu < 0) mu = 1e-3;
    // Active set: at a bound with the descent direction (−g) pointing out of the box.
    const free = Array.from({ length: n }, (_, a) => !((p[a] <= lo[a] && g[a] > 0) || (p[a] >= hi[a] && g[a] < 0)));
    const idx = [...Array(n).keys()].filter((a) => free[a]);
    if (idx.length === 0) {
      converged = true;
      break;
    }
    let accepted = false;
    for (let tries = 0; tries < 30 && !accepted; tries++) {
      const M = idx.map((a) => Float64Array.from(idx, (b) => A[a][b] + (a === b ? mu * Math.max(A[a][a], 1e-12 * maxDiag, 1e-300) : 0)));
      const d = solveDense(M, Float64Array.from(idx, (a) => -g[a]));
      if (!d) {
        mu *= nu;
        nu *= 2;
        continue;
      }
      const step = new Float64Array(n);
      idx.forEach((a, k) => (step[a] = d[k]));
      const trial = clip(p.map((v, a) => v + step[a]));
      const actual = trial.map((v, a) => v - p[a]);
      // Predicted decrease of the linear model for the (clipped) step actually taken.
      let pred = 0;
      for (let a = 0; a < n; a++) {
        let Aa = 0;
        for (let b = 0; b < n; b++) Aa += A[a][b] * actual[b];
        pred -= 2 * g[a] * actual[a] + actual[a] * Aa;
      }
      const rt = f(trial);
      const ct = sumSq(rt);
      const rho = pred > 0 ? (cost - ct) / pred : ct < cost ? 1 : -1;
      if (ct < cost && rho > 0) {
        accepted = true;
        const small = actual.every((v, a) => Math.abs(v) < stepTol * Math.abs(o.steps[a]));
        const drop = cost - ct;
        const relDrop = drop / Math.max(cost, 1e-300);
        p = trial;
        r = rt;
        cost = ct;
        mu *= Math.max(1 / 3, 1 - (2 * rho - 1) ** 3);
        nu = 2;
        o.onIteration?.({ iteration: it + 1, cost, p, mu });
        if (relDrop < relTol || small || drop < (o.absTol ?? 0)) {
          converged = true;
          break;
        }
        J = jac(p, r);
      } else {
        mu *= nu;
        nu *= 2;
        if (actual.every((v, a) => Math.abs(v) < 1e-3 * stepTol * Math.abs(o.steps[a]))) {
          // The damped step has shrunk to nothing: no decrease is possible from here.
          converged = true;
          break;
        }
      }
    }
    if (converged || !accepted) {
      converged = converged || !accepted;
      break;
    }
  }
  return { p, residuals: r, cost, iterations: it + 1, evaluations, jacobian: J, atBound: Array.from(p, (v, a) => v <= lo[a] || v >= hi[a]), converged };
}

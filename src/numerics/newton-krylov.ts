/**
 * Jacobian-free Newton–Krylov: the root of a residual r(x) = 0 by Newton's method, each
 * linear step J δ = −r solved by restarted GMRES (Saad & Schultz, SIAM J. Sci. Stat. Comput. 7,
 * 856 (1986); Givens rotations for the small least-squares problem) with products J·v taken by a
 * forward difference (r(x + εv) − r(x))/ε (Knoll & Keyes, J. Comput. Phys. 193, 357 (2004)).
 * Unlike a fixed-point iteration it converges to unstable stationary points as well as stable
 * ones, which is what a disordered state above its spinodal is. A backtracking line search on
 * ‖r‖ keeps the steps from overshooting. No physics here.
 */

export interface NewtonKrylovOptions {
  tolerance: number;
  maxNewton?: number;
  /** Krylov vectors before a GMRES restart, and restarts per Newton step. */
  krylov?: number;
  restarts?: number;
  /** Relative accuracy asked of each linear solve (a fixed forcing term). */
  forcing?: number;
  /** Applied to every new iterate (a gauge fix that removes a null direction of J). */
  project?: (x: Float64Array) => void;
}

export interface NewtonKrylovResult {
  x: Float64Array;
  residual: number;
  newtonSteps: number;
  residualEvaluations: number;
  converged: boolean;
}

const norm = (v: ArrayLike<number>) => {
  let s = 0;
  for (let i = 0; i < v.length; i++) s += v[i] * v[i];
  return Math.sqrt(s);
};
const maxAbs = (v: ArrayLike<number>) => {
  let m = 0;
  for (let i = 0; i < v.length; i++) m = Math.max(m, Math.abs(v[i]));
  return m;
};

/** GMRES(m) for A x = b from x = 0; returns x. */
function gmres(apply: (v: Float64Array) => Float64Array, b: Float64Array, m: number, restarts: number, relTol: number): Float64Array {
  const n = b.length;
  const x = new Float64Array(n);
  const bnorm = norm(b);
  if (bnorm === 0) return x;
  for (let cycle = 0; cycle <= restarts; cycle++) {
    const ax = cycle === 0 ? new Float64Array(n) : apply(x);
    const r0 = Float64Array.from(b, (bi, i) => bi - ax[i]);
    const beta = norm(r0);
    if (beta <= relTol * bnorm) return x;
    const V: Float64Array[] = [r0.map((v) => v / beta)];
    const H: Float64Array[] = [];
    const cs: number[] = [];
    const sn: number[] = [];
    const g = new Float64Array(m + 1);
    g[0] = beta;
    let k = 0;
    for (; k < m; k++) {
      const w = apply(V[k]);
      const h = new Float64Array(k + 2);
      for (let i = 0; i <= k; i++) {
        let dot = 0;
        for (let j = 0; j < n; j++) dot += w[j] * V[i][j];
        h[i] = dot;
        for (let j = 0; j < n; j++) w[j] -= dot * V[i][j];
      }
      h[k + 1] = norm(w);
      for (let i = 0; i < k; i++) {
        const t = cs[i] * h[i] + sn[i] * h[i + 1];
        h[i + 1] = -sn[i] * h[i] + cs[i] * h[i + 1];
        h[i] = t;
      }
      const rr = Math.hypot(h[k], h[k + 1]);
      cs[k] = rr === 0 ? 1 : h[k] / rr;
      sn[k] = rr === 0 ? 0 : h[k + 1] / rr;
      const hk1 = h[k + 1];
      h[k] = rr;
      h[k + 1] = 0;
      g[k + 1] = -sn[k] * g[k];
      g[k] = cs[k] * g[k];
      H.push(h);
      if (Math.abs(g[k + 1]) <= relTol * bnorm || hk1 === 0) {
        k++;
        break;
      }
      V.push(w.map((v) => v / hk1));
    }
    // Back substitution for the k coefficients, then x += V y.
    const y = new Float64Array(k);
    for (let i = k - 1; i >= 0; i--) {
      let s = g[i];
      for (let j = i + 1; j < k; j++) s -= H[j][i] * y[j];
      y[i] = H[i][i] === 0 ? 0 : s / H[i][i];
    }
    for (let i = 0; i < k; i++) for (let j = 0; j < n; j++) x[j] += y[i] * V[i][j];
    if (Math.abs(g[k]) <= relTol * bnorm) return x;
  }
  return x;
}

export function newtonKrylov(residual: (x: Float64Array) => Float64Array, x0: ArrayLike<number>, opts: NewtonKrylovOptions): NewtonKrylovResult {
  const maxNewton = opts.maxNewton ?? 30;
  const krylov = opts.krylov ?? 40;
  const restarts = opts.restarts ?? 2;
  const forcing = opts.forcing ?? 1e-3;
  let evaluations = 0;
  const r = (v: Float64Array) => {
    evaluations++;
    return residual(v);
  };
  const x = Float64Array.from(x0);
  opts.project?.(x);
  let rx = r(x);
  let steps = 0;
  for (; steps < maxNewton; steps++) {
    if (maxAbs(rx) < opts.tolerance) return { x, residual: maxAbs(rx), newtonSteps: steps, residualEvaluations: evaluations, converged: true };
    const xn = norm(x);
    const apply = (v: Float64Array) => {
      const vn = norm(v);
      if (vn === 0) return new Float64Array(v.length);
      const eps = (Math.sqrt(1e-16) * (1 + xn)) / vn;
      const xe = Float64Array.from(x, (xi, i) => xi + eps * v[i]);
      const re = r(xe);
      return Float64Array.from(re, (v2, i) => (v2 - rx[i]) / eps);
    };
    const delta = gmres(apply, Float64Array.from(rx, (v) => -v), krylov, restarts, forcing);
    // Backtracking on ‖r‖₂: full step first, halving up to eight times.
    const base = norm(rx);
    let t = 1;
    let accepted = false;
    for (let tries = 0; tries < 8; tries++, t /= 2) {
      const trial = Float64Array.from(x, (xi, i) => xi + t * delta[i]);
      opts.project?.(trial);
      const rt = r(trial);
      if (Number.isFinite(norm(rt)) && norm(rt) < (1 - 1e-4 * t) * base) {
        x.set(trial);
        rx = rt;
        accepted = true;
        break;
      }
    }
    if (!accepted) break;
  }
  const res = maxAbs(rx);
  return { x, residual: res, newtonSteps: steps, residualEvaluations: evaluations, converged: res < opts.tolerance };
}

/**
 * Levenberg–Marquardt minimisation of ½‖r(x)‖² for r: Rⁿ → Rᵐ, in float64, pure JS.
 *
 * Method (damped Gauss–Newton): at x, with J = ∂r/∂x, g = Jᵀr and A = JᵀJ, the step h solves
 *     (A + μ D) h = −g,
 * D = diag(A) (Marquardt's scaling, each diagonal kept ≥ 1e-12·max diag so unused
 * parameters stay well posed) or D = I. When the caller gives J itself and m < n (fewer
 * residuals than parameters), the same step with D = I comes from the m × m residual-space
 * (dual) system: h = −Jᵀ y, (J Jᵀ + μ I) y = r, since Jᵀ(J Jᵀ + μI)⁻¹ = (JᵀJ + μI)⁻¹Jᵀ
 * (push-through identity).
 *
 * Damping update of Nielsen (H. B. Nielsen, "Damping parameter in Marquardt's method",
 * IMM-REP-1999-05, DTU 1999), as in Madsen, Nielsen & Tingleff, "Methods for non-linear
 * least squares problems" (IMM, 2nd ed. 2004), Algorithm 3.16:
 *     ρ = (F(x) − F(x + h)) / (L(0) − L(h)),   L(h) = ½‖r + J h‖²,
 *     ρ > 0: accept, μ ← μ · max(1/3, 1 − (2ρ − 1)³), ν ← 2;   else μ ← μ ν, ν ← 2ν;
 * first μ = τ · max_i A_ii. A rejected step re-solves with the larger μ on the same J; a
 * damped system that does not factorise, or gives a non-finite step, counts as a rejected step.
 * The linear systems are factorised by Cholesky (numerics/cholesky.ts).
 *
 * Units: whatever the caller's r and x carry. F = ½‖r‖² throughout ("cost").
 */
import { cholesky, choleskySolve } from './cholesky.js';
import { groupedNormalEquations } from './grouped-normal-equations.js';
import { runToEnd, runYielding } from './stepwise.js';
import type { Stepwise } from './stepwise.js';

/** The Gauss–Newton system at x, as normal equations (A = JᵀJ row-major n·n, lower triangle read, g = Jᵀr). */
export interface NormalLinearisation {
  kind: 'normal';
  cost: number;
  A: Float64Array;
  g: Float64Array;
}

/** J itself (row-major m·n) and r: the solver picks the normal or the dual system by m and n. */
export interface DenseLinearisation {
  kind: 'dense';
  cost: number;
  m: number;
  J: Float64Array;
  r: Float64Array;
}

export type Linearisation = NormalLinearisation | DenseLinearisation;

export interface LeastSquaresProblem {
  /** Number of parameters n. */
  size: number;
  /** ½‖r(x)‖² (for trial steps). */
  cost(x: Float64Array): number;
  /** The Gauss–Newton system at x. */
  linearise(x: Float64Array): Linearisation;
  /**
   * Jᵀr(x) with J the Jacobian of the last `linearise` call (not re-formed at x), for the
   * extra steps of LmOptions.extraSteps; absent: no extra steps.
   */
  gradientWithLastJacobian?(x: Float64Array): Float64Array;
}

export interface LmIteration {
  iteration: number;
  cost: number;
  /** Damping μ after this iteration's update. */
  mu: number;
  /** Trial steps rejected before the accepted one (or before giving up). */
  rejected: number;
  /** max_i |g_i| at the iterate before the step. */
  gradientNorm: number;
  /** 'normal' or 'dual': the linear system that gave the step. */
  system: 'normal' | 'dual';
  /** Extra steps taken (LmOptions.extraSteps > 0). */
  extraSteps?: number;
}

export interface LmOptions {
  maxIterations?: number;
  /** First μ = tau · max diag(JᵀJ). */
  tau?: number;
  /** First μ given outright (e.g. the μ a previous solve of a nearby problem ended with); overrides tau. */
  initialMu?: number;
  /** D = diag(JᵀJ) ('marquardt') or I ('identity'); the dual system needs 'identity'. */
  damping?: 'marquardt' | 'identity';
  /** Use the dual system when J is given and m < n ('auto'), never, or always when J is given. */
  dual?: 'auto' | 'never' | 'always';
  /** Stop when max |g_i| ≤ this. */
  gradientTolerance?: number;
  /** Stop when ‖h‖ ≤ stepTolerance (‖x‖ + stepTolerance). */
  stepTolerance?: number;
  /** Stop when the cost is ≤ this. */
  costTolerance?: number;
  /** Trial steps per iteration before giving up. */
  maxRejections?: number;
  /**
   * Extra steps per accepted step with the same damped matrix (modified LM of J. Fan, "The
   * modified Levenberg–Marquardt method for nonlinear equations with cubic convergence",
   * Math. Comp. 81 (2012) 447–466): at y = x + h, ĥ = −(A + μD)⁻¹ J(x)ᵀ r(y), reusing the
   * factorisation and the Jacobian of x; taken while it lowers the cost. Needs the problem's
   * gradientWithLastJacobian. Default 0.
   */
  extraSteps?: number;
  /** Called after every iteration with the current x; return false to stop. */
  onIteration?: (it: LmIteration, x: Float64Array) => boolean | void;
}

/** 'interrupted': the driver was asked to stop (levenbergMarquardtYielding's shouldStop). */
export type LmStop = 'gradient' | 'step' | 'cost' | 'maxIterations' | 'stalled' | 'callback' | 'interrupted';

export interface LmResult {
  x: Float64Array;
  cost: number;
  iterations: number;
  reason: LmStop;
  mu: number;
}

function dot(a: Float64Array, b: Float64Array): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i] * b[i];
  return s;
}

function norm(a: Float64Array): number {
  return Math.sqrt(dot(a, a));
}

/** Aᵀ r with A row-major m·n. */
function transposeTimes(J: Float64Array, m: number, n: number, r: Float64Array): Float64Array {
  const g = new Float64Array(n);
  for (let i = 0; i < m; i++) {
    const ri = r[i];
    if (ri === 0) continue;
    const o = i * n;
    for (let j = 0; j < n; j++) g[j] += J[o + j] * ri;
  }
  return g;
}

/**
 * Lower triangle of JᵀJ (row-major n·n) from J row-major m·n: the one-group case of
 * numerics/grouped-normal-equations.ts (its chunked, register-blocked product).
 */
export function normalMatrix(J: Float64Array, m: number, n: number): Float64Array {
  return groupedNormalEquations(n, [{ columns: Int32Array.from({ length: n }, (_, i) => i), J, r: new Float64Array(m) }]).A;
}

/** The step system at one linearisation, prepared once and solved for several μ. */
interface StepSystem {
  kind: 'normal' | 'dual';
  g: Float64Array;
  diagonal: Float64Array;
  maxDiagonal: number;
  solve(mu: number): Float64Array;
  /** −(A + μD)⁻¹ rhs with the factorisation of the last solve(mu) (that μ); null if none. */
  solveAgain?(rhs: Float64Array): Float64Array | null;
  /** L(0) − L(h): the reduction the linear model predicts. */
  predicted(h: Float64Array): number;
}

function stepSystem(lin: Linearisation, n: number, damping: 'marquardt' | 'identity', dual: 'auto' | 'never' | 'always'): StepSystem {
  if (lin.kind === 'dense') {
    const { J, r, m } = lin;
    if (J.length !== m * n || r.length !== m) throw new RangeError(`levenbergMarquardt: J has ${J.length} entries and r ${r.length}, expected ${m}·${n} and ${m}`);
    const g = transposeTimes(J, m, n, r);
    const useDual = damping === 'identity' && (dual === 'always' || (dual === 'auto' && m < n));
    if (useDual) {
      // K = J Jᵀ (m·m), lower triangle.
      const K = new Float64Array(m * m);
      for (let i = 0; i < m; i++) for (let k = 0; k <= i; k++) {
        let s = 0;
        const oi = i * n;
        const ok = k * n;
        for (let j = 0; j < n; j++) s += J[oi + j] * J[ok + j];
        K[i * m + k] = s;
      }
      // diag(JᵀJ) for the first μ and its scale.
      const diagonal = new Float64Array(n);
      for (let i = 0; i < m; i++) for (let j = 0; j < n; j++) diagonal[j] += J[i * n + j] ** 2;
      let maxDiagonal = 0;
      for (const d of diagonal) maxDiagonal = Math.max(maxDiagonal, d);
      return {
        kind: 'dual',
        g,
        diagonal,
        maxDiagonal,
        solve: (mu) => {
          const Km = K.slice();
          for (let i = 0; i < m; i++) Km[i * m + i] += mu;
          const y = choleskySolve(cholesky(Km, m), r);
          const h = transposeTimes(J, m, n, y);
          for (let j = 0; j < n; j++) h[j] = -h[j];
          return h;
        },
        predicted: (h) => predictedFromJ(J, m, n, r, h),
      };
    }
    return normalSystem({ kind: 'normal', cost: lin.cost, A: normalMatrix(J, m, n), g }, n, damping);
  }
  return normalSystem(lin, n, damping);
}

function predictedFromJ(J: Float64Array, m: number, n: number, r: Float64Array, h: Float64Array): number {
  let before = 0;
  let after = 0;
  for (let i = 0; i < m; i++) {
    let jh = 0;
    const o = i * n;
    for (let j = 0; j < n; j++) jh += J[o + j] * h[j];
    before += r[i] * r[i];
    after += (r[i] + jh) ** 2;
  }
  return 0.5 * (before - after);
}

function normalSystem(lin: NormalLinearisation, n: number, damping: 'marquardt' | 'identity'): StepSystem {
  const { A, g } = lin;
  if (A.length !== n * n || g.length !== n) throw new RangeError(`levenbergMarquardt: A has ${A.length} entries and g ${g.length}, expected ${n}·${n} and ${n}`);
  const diagonal = new Float64Array(n);
  let maxDiagonal = 0;
  for (let i = 0; i < n; i++) {
    diagonal[i] = A[i * n + i];
    maxDiagonal = Math.max(maxDiagonal, diagonal[i]);
  }
  const floor = 1e-12 * (maxDiagonal > 0 ? maxDiagonal : 1);
  const D = damping === 'marquardt' ? Float64Array.from(diagonal, (d) => Math.max(d, floor)) : new Float64Array(n).fill(1);
  let lastFactor: ReturnType<typeof cholesky> | null = null;
  return {
    kind: 'normal',
    g,
    diagonal,
    maxDiagonal,
    solve: (mu) => {
      const M = A.slice();
      for (let i = 0; i < n; i++) M[i * n + i] += mu * D[i];
      const minusG = Float64Array.from(g, (v) => -v);
      lastFactor = cholesky(M, n);
      return choleskySolve(lastFactor, minusG);
    },
    solveAgain: (rhs) => (lastFactor ? choleskySolve(lastFactor, Float64Array.from(rhs, (v) => -v)) : null),
    // L(0) − L(h) = −hᵀg − ½ hᵀ A h (A's lower triangle holds the symmetric matrix).
    predicted: (h) => {
      let hAh = 0;
      for (let i = 0; i < n; i++) {
        const o = i * n;
        let s = 0;
        for (let j = 0; j < i; j++) s += A[o + j] * h[j];
        hAh += 2 * h[i] * s + A[o + i] * h[i] * h[i];
      }
      return -dot(h, g) - 0.5 * hAh;
    },
  };
}

/** The step at μ, or null when its system does not factorise (cholesky.ts throws a RangeError). */
function trySolve(sys: StepSystem, mu: number): Float64Array | null {
  try {
    const h = sys.solve(mu);
    return h.every(Number.isFinite) ? h : null;
  } catch (e) {
    if (e instanceof RangeError && e.message.startsWith('cholesky:')) return null;
    throw e;
  }
}

export function levenbergMarquardt(problem: LeastSquaresProblem, x0: Float64Array, options: LmOptions = {}): LmResult {
  return runToEnd(levenbergMarquardtSteps(problem, x0, options));
}

/** levenbergMarquardt with one event-loop pause after every iteration (numerics/stepwise.ts); `shouldStop()` true ends it with reason 'interrupted'. */
export function levenbergMarquardtYielding(problem: LeastSquaresProblem, x0: Float64Array, options: LmOptions, pause: () => Promise<void>, shouldStop: () => boolean): Promise<LmResult> {
  return runYielding(levenbergMarquardtSteps(problem, x0, options), pause, shouldStop);
}

/** The iterations of levenbergMarquardt, one yield after each (the answer false stops it). */
export function* levenbergMarquardtSteps(problem: LeastSquaresProblem, x0: Float64Array, options: LmOptions = {}): Stepwise<LmIteration, LmResult> {
  const n = problem.size;
  if (x0.length !== n) throw new RangeError(`levenbergMarquardt: x0 has ${x0.length} entries, the problem ${n}`);
  const maxIterations = options.maxIterations ?? 100;
  const tau = options.tau ?? 1e-3;
  const damping = options.damping ?? 'marquardt';
  const dual = options.dual ?? 'auto';
  const tolG = options.gradientTolerance ?? 0;
  const tolX = options.stepTolerance ?? 0;
  const tolF = options.costTolerance ?? 0;
  const maxRejections = options.maxRejections ?? 30;
  const extraSteps = options.extraSteps ?? 0;
  let x = Float64Array.from(x0);
  let mu = options.initialMu !== undefined && options.initialMu > 0 ? options.initialMu : Number.NaN;
  let nu = 2;
  let cost = Number.NaN;
  for (let it = 1; it <= maxIterations; it++) {
    const lin = problem.linearise(x);
    cost = lin.cost;
    if (cost <= tolF) return { x, cost, iterations: it - 1, reason: 'cost', mu };
    const sys = stepSystem(lin, n, damping, dual);
    let gMax = 0;
    for (const v of sys.g) gMax = Math.max(gMax, Math.abs(v));
    if (gMax <= tolG) return { x, cost, iterations: it - 1, reason: 'gradient', mu };
    if (Number.isNaN(mu)) mu = tau * (sys.maxDiagonal > 0 ? sys.maxDiagonal : 1);
    let rejected = 0;
    let extraTaken = 0;
    let accepted = false;
    let small = false;
    while (!accepted && rejected <= maxRejections) {
      const h = trySolve(sys, mu);
      if (!h) {
        // A + μD did not factorise (a normal matrix with non-finite entries, or one so far
        // from positive definite that Cholesky's shifts gave up): a rejected step, μ grows.
        mu *= nu;
        nu *= 2;
        rejected++;
        continue;
      }
      if (norm(h) <= tolX * (norm(x) + tolX)) {
        small = true;
        break;
      }
      const trial = Float64Array.from(x, (v, i) => v + h[i]);
      const trialCost = problem.cost(trial);
      const predicted = sys.predicted(h);
      const rho = predicted > 0 && Number.isFinite(trialCost) ? (cost - trialCost) / predicted : -1;
      if (rho > 0) {
        x = trial;
        cost = trialCost;
        // Fan's extra steps, with the factorisation of this μ (before its update).
        for (let e = 0; e < extraSteps && problem.gradientWithLastJacobian && sys.solveAgain; e++) {
          const h2 = sys.solveAgain(problem.gradientWithLastJacobian(x));
          if (!h2 || !h2.every(Number.isFinite)) break;
          const y = Float64Array.from(x, (v, i) => v + h2[i]);
          const c2 = problem.cost(y);
          if (!(c2 < cost)) break;
          x = y;
          cost = c2;
          extraTaken++;
        }
        mu *= Math.max(1 / 3, 1 - (2 * rho - 1) ** 3);
        nu = 2;
        accepted = true;
      } else {
        mu *= nu;
        nu *= 2;
        rejected++;
      }
    }
    const info: LmIteration = { iteration: it, cost, mu, rejected, gradientNorm: gMax, system: sys.kind, ...(extraSteps > 0 ? { extraSteps: extraTaken } : {}) };
    if (options.onIteration?.(info, x) === false) return { x, cost, iterations: it, reason: 'callback', mu };
    if (small) return { x, cost, iterations: it, reason: 'step', mu };
    if (!accepted) return { x, cost, iterations: it, reason: 'stalled', mu };
    if (it < maxIterations && (yield info) === false) return { x, cost, iterations: it, reason: 'interrupted', mu };
  }
  return { x, cost, iterations: maxIterations, reason: 'maxIterations', mu };
}

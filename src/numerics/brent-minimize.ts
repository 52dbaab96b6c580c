/**
 * One-dimensional minimisation: downhill bracketing with golden-ratio expansion, then
 * Brent's method (parabolic interpolation safeguarded by golden section; Brent,
 * "Algorithms for Minimization without Derivatives", 1973, ch. 5).
 */

export interface MinimizeResult {
  x: number;
  fx: number;
  evaluations: number;
  /** Half-width of the final bracket: the tolerance actually reached on x. */
  tolerance: number;
}

const GOLD = 1.618033988749895;
const CGOLD = 0.3819660112501051;

export interface Bracket {
  a: number;
  b: number;
  c: number;
  fb: number;
}

/** Find a < b < c (or c < b < a) with f(b) < f(a), f(b) < f(c), starting from x0 and x1. */
export function bracketMinimum(fn: (x: number) => number, x0: number, x1: number, lower: number, upper: number, maxEvaluations = 40): Bracket & { evaluations: number } {
  let a = x0;
  let b = x1;
  let fa = fn(a);
  let fb = fn(b);
  let evaluations = 2;
  if (fb > fa) {
    [a, b] = [b, a];
    [fa, fb] = [fb, fa];
  }
  let c = Math.min(upper, Math.max(lower, b + GOLD * (b - a)));
  let fc = fn(c);
  evaluations++;
  while (fc <= fb) {
    if (evaluations >= maxEvaluations || c === lower || c === upper) {
      throw new Error(`no minimum found between ${lower} and ${upper}: the function still decreases at ${c}`);
    }
    a = b;
    fa = fb;
    b = c;
    fb = fc;
    c = Math.min(upper, Math.max(lower, b + GOLD * (b - a)));
    fc = fn(c);
    evaluations++;
  }
  return { a, b, c, fb, evaluations };
}

/** Brent's method on a bracket; stops when the bracket half-width is below tol·|x| + tiny. */
export function brentMinimize(fn: (x: number) => number, br: Bracket, relTol: number, maxIterations = 100): MinimizeResult {
  let a = Math.min(br.a, br.c);
  let b = Math.max(br.a, br.c);
  let x = br.b;
  let w = x;
  let v = x;
  let fx = br.fb;
  let fw = fx;
  let fv = fx;
  let d = 0;
  let e = 0;
  let evaluations = 0;
  for (let iter = 0; iter < maxIterations; iter++) {
    const xm = 0.5 * (a + b);
    const tol1 = relTol * Math.abs(x) + 1e-12;
    const tol2 = 2 * tol1;
    if (Math.abs(x - xm) <= tol2 - 0.5 * (b - a)) break;
    let useGolden = true;
    if (Math.abs(e) > tol1) {
      const r = (x - w) * (fx - fv);
      let q = (x - v) * (fx - fw);
      let p = (x - v) * q - (x - w) * r;
      q = 2 * (q - r);
      if (q > 0) p = -p;
      q = Math.abs(q);
      const etemp = e;
      e = d;
      if (!(Math.abs(p) >= Math.abs(0.5 * q * etemp) || p <= q * (a - x) || p >= q * (b - x))) {
        d = p / q;
        const u = x + d;
        if (u - a < tol2 || b - u < tol2) d = xm - x >= 0 ? tol1 : -tol1;
        useGolden = false;
      }
    }
    if (useGolden) {
      e = x >= xm ? a - x : b - x;
      d = CGOLD * e;
    }
    const u = Math.abs(d) >= tol1 ? x + d : x + (d >= 0 ? tol1 : -tol1);
    const fu = fn(u);
    evaluations++;
    if (fu <= fx) {
      if (u >= x) a = x;
      else b = x;
      v = w;
      fv = fw;
      w = x;
      fw = fx;
      x = u;
      fx = fu;
    } else {
      if (u < x) a = u;
      else b = u;
      if (fu <= fw || w === x) {
        v = w;
        fv = fw;
        w = u;
        fw = fu;
      } else if (fu <= fv || v === x || v === w) {
        v = u;
        fv = fu;
      }
    }
  }
  return { x, fx, evaluations, tolerance: 0.5 * (b - a) };
}

/**
 * Root of a continuous function on a bracket where it changes sign: Brent's method
 * (bisection safeguarding secant and inverse quadratic interpolation; Brent,
 * "Algorithms for Minimization without Derivatives", 1973, ch. 4, the zeroin routine).
 */

export interface RootResult {
  x: number;
  fx: number;
  evaluations: number;
}

/**
 * Find x in [a, b] with fn(x) = 0, given fa = fn(a) and fb = fn(b) of opposite signs
 * (passed in so that known values are not recomputed). Stops when the bracket is below
 * 2·(4ε|x| + tol).
 */
export function brentRoot(fn: (x: number) => number, a: number, b: number, fa: number, fb: number, tol: number, maxIterations = 60): RootResult {
  if (fa === 0) return { x: a, fx: 0, evaluations: 0 };
  if (fb === 0) return { x: b, fx: 0, evaluations: 0 };
  if (Math.sign(fa) === Math.sign(fb)) throw new Error(`brentRoot: no sign change on [${a}, ${b}] (f = ${fa}, ${fb})`);
  let c = a;
  let fc = fa;
  let d = b - a;
  let e = d;
  let evaluations = 0;
  for (let iter = 0; iter < maxIterations; iter++) {
    if (Math.sign(fb) === Math.sign(fc)) {
      c = a;
      fc = fa;
      d = b - a;
      e = d;
    }
    if (Math.abs(fc) < Math.abs(fb)) {
      a = b;
      b = c;
      c = a;
      fa = fb;
      fb = fc;
      fc = fa;
    }
    const tol1 = 2 * Number.EPSILON * Math.abs(b) + 0.5 * tol;
    const xm = 0.5 * (c - b);
    if (Math.abs(xm) <= tol1 || fb === 0) return { x: b, fx: fb, evaluations };
    if (Math.abs(e) >= tol1 && Math.abs(fa) > Math.abs(fb)) {
      let p: number;
      let q: number;
      const s = fb / fa;
      if (a === c) {
        p = 2 * xm * s;
        q = 1 - s;
      } else {
        const qq = fa / fc;
        const r = fb / fc;
        p = s * (2 * xm * qq * (qq - r) - (b - a) * (r - 1));
        q = (qq - 1) * (r - 1) * (s - 1);
      }
      if (p > 0) q = -q;
      p = Math.abs(p);
      if (2 * p < Math.min(3 * xm * q - Math.abs(tol1 * q), Math.abs(e * q))) {
        e = d;
        d = p / q;
      } else {
        d = xm;
        e = d;
      }
    } else {
      d = xm;
      e = d;
    }
    a = b;
    fa = fb;
    b += Math.abs(d) > tol1 ? d : xm > 0 ? tol1 : -tol1;
    fb = fn(b);
    evaluations++;
  }
  return { x: b, fx: fb, evaluations };
}

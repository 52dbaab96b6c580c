/**
 * An independent MDE solver for tests: second-order central differences in x on a
 * periodic grid and Crank–Nicolson in s (Crank & Nicolson, Proc. Camb. Phil. Soc. 43,
 * 50 (1947)), for a homopolymer (D = 1) in a fixed field w(x). The cyclic tridiagonal
 * system is solved with the Thomas algorithm plus a Sherman–Morrison correction.
 */

function solveCyclic(a: number, b: Float64Array, c: number, rhs: Float64Array): Float64Array {
  // Matrix with diagonal b[i], off-diagonals a (below) and c (above), corners a (top right) and c (bottom left).
  const n = rhs.length;
  const gamma = -b[0];
  const bb = Float64Array.from(b);
  bb[0] -= gamma;
  bb[n - 1] -= (c * a) / gamma;
  const thomas = (d: Float64Array): Float64Array => {
    const cp = new Float64Array(n);
    const dp = new Float64Array(n);
    cp[0] = c / bb[0];
    dp[0] = d[0] / bb[0];
    for (let i = 1; i < n; i++) {
      const m = bb[i] - a * cp[i - 1];
      cp[i] = c / m;
      dp[i] = (d[i] - a * dp[i - 1]) / m;
    }
    const x = new Float64Array(n);
    x[n - 1] = dp[n - 1];
    for (let i = n - 2; i >= 0; i--) x[i] = dp[i] - cp[i] * x[i + 1];
    return x;
  };
  const y = thomas(rhs);
  const u = new Float64Array(n);
  u[0] = gamma;
  u[n - 1] = c;
  const z = thomas(u);
  // v = (1, 0, …, 0, a/γ)
  const vy = y[0] + (a / gamma) * y[n - 1];
  const vz = z[0] + (a / gamma) * z[n - 1];
  const f = vy / (1 + vz);
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = y[i] - f * z[i];
  return out;
}

/** q(x, 1) for ∂q/∂s = ∂²q/∂x² − w q, q(x, 0) = 1, on nx points of a cell of length L. */
export function crankNicolsonQ1(w: Float64Array, length: number, ns: number): Float64Array {
  const nx = w.length;
  const dx = length / nx;
  const ds = 1 / ns;
  const r = ds / (2 * dx * dx);
  let q = new Float64Array(nx).fill(1);
  const diag = new Float64Array(nx);
  for (let j = 0; j < nx; j++) diag[j] = 1 + 2 * r + (ds / 2) * w[j];
  for (let k = 0; k < ns; k++) {
    const rhs = new Float64Array(nx);
    for (let j = 0; j < nx; j++) {
      const lap = q[(j + 1) % nx] - 2 * q[j] + q[(j - 1 + nx) % nx];
      rhs[j] = q[j] + r * lap - (ds / 2) * w[j] * q[j];
    }
    q = solveCyclic(-r, diag, -r, rhs);
  }
  return q;
}

/**
 * Anderson mixing for the fixed-point problem x = x + d(x) (Anderson, J. ACM 12, 547
 * (1965); in the form used for SCFT by Stasiak & Matsen, Eur. Phys. J. E 34, 110 (2011)).
 *
 * With the newest iterate x_k, its deviation d_k and up to m earlier pairs:
 *   U_ij = (d_k − d_{k−i})·(d_k − d_{k−j}),  V_i = (d_k − d_{k−i})·d_k,  C = U⁻¹V,
 *   x̄ = x_k + Σ C_i (x_{k−i} − x_k),  d̄ = d_k + Σ C_i (d_{k−i} − d_k),
 *   x_{k+1} = x̄ + λ d̄.
 * A singular U (a stalled history) clears the history and falls back to x + λ d.
 */
import { solveDense } from '../numerics/dense-solve.js';

export class AndersonMixer {
  private xs: Float64Array[] = [];
  private ds: Float64Array[] = [];

  constructor(
    private readonly history: number,
    /** λ of x_{k+1} = x̄ + λ d̄; lowered by the solver's divergence safeguard. */
    public mixing: number,
  ) {}

  reset(): void {
    this.xs = [];
    this.ds = [];
  }

  next(x: Float64Array, d: Float64Array): Float64Array {
    this.xs.unshift(Float64Array.from(x));
    this.ds.unshift(Float64Array.from(d));
    if (this.xs.length > this.history + 1) {
      this.xs.pop();
      this.ds.pop();
    }
    const n = x.length;
    const m = this.xs.length - 1;
    const out = new Float64Array(n);
    const coeffs = m > 0 ? this.coefficients(m) : undefined;
    if (!coeffs) {
      if (m > 0) {
        this.xs.length = 1;
        this.ds.length = 1;
      }
      for (let j = 0; j < n; j++) out[j] = x[j] + this.mixing * d[j];
      return out;
    }
    const x0 = this.xs[0];
    const d0 = this.ds[0];
    for (let j = 0; j < n; j++) {
      let xb = x0[j];
      let db = d0[j];
      for (let i = 1; i <= m; i++) {
        xb += coeffs[i - 1] * (this.xs[i][j] - x0[j]);
        db += coeffs[i - 1] * (this.ds[i][j] - d0[j]);
      }
      out[j] = xb + this.mixing * db;
    }
    return out;
  }

  private coefficients(m: number): Float64Array | undefined {
    const d0 = this.ds[0];
    const n = d0.length;
    const diffs = this.ds.slice(1).map((di) => {
      const v = new Float64Array(n);
      for (let j = 0; j < n; j++) v[j] = d0[j] - di[j];
      return v;
    });
    const U = Array.from({ length: m }, () => new Float64Array(m));
    const V = new Float64Array(m);
    for (let a = 0; a < m; a++) {
      for (let b = a; b < m; b++) {
        let s = 0;
        for (let j = 0; j < n; j++) s += diffs[a][j] * diffs[b][j];
        U[a][b] = s;
        U[b][a] = s;
      }
      let v = 0;
      for (let j = 0; j < n; j++) v += diffs[a][j] * d0[j];
      V[a] = v;
    }
    return solveDense(U, V);
  }
}

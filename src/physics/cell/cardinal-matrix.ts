/**
 * A cell's interpolant as a matrix: column j is the interpolant of the unit grid vector e_j
 * (the cardinal function of grid point j) read at the given points, so that
 * u(at_i) = Σ_j u_j M[j·m + i] for any grid values u. Exact for whatever interpolant the cell
 * uses, because the interpolant is linear in the grid values.
 */
export function cardinalMatrix(n: number, at: ArrayLike<number>, interpolate: (u: Float64Array, at: ArrayLike<number>) => Float64Array): Float64Array {
  const m = at.length;
  const out = new Float64Array(n * m);
  const e = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    e.fill(0);
    e[j] = 1;
    out.set(interpolate(e, at), j * m);
  }
  return out;
}

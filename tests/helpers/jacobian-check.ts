/**
 * The largest difference between a least-squares problem's Jacobian columns and central
 * differences of its residuals (an independent check of the exact Jacobian: the difference
 * quotient (r(x + h e_a) − r(x − h e_a)) / 2h, common practice, no source).
 */
import type { DenseLinearisation, LeastSquaresProblem } from '../../src/numerics/levenberg-marquardt.js';

export function worstJacobianColumnError(problem: Pick<LeastSquaresProblem, 'linearise' | 'size'>, x: Float64Array, columns: readonly number[], h = 1e-6): number {
  const lin = problem.linearise(x) as DenseLinearisation;
  const residualsAt = (a: number, step: number) => {
    const xs = Float64Array.from(x);
    xs[a] += step;
    return (problem.linearise(xs) as DenseLinearisation).r;
  };
  let worst = 0;
  for (const a of columns) {
    const rp = residualsAt(a, h);
    const rm = residualsAt(a, -h);
    for (let i = 0; i < lin.m; i++) worst = Math.max(worst, Math.abs((rp[i] - rm[i]) / (2 * h) - lin.J[i * problem.size + a]));
  }
  return worst;
}

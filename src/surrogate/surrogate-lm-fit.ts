/**
 * The surrogate's field fit as nonlinear least squares in float64, solved by the project's
 * Levenberg–Marquardt kernel (numerics/levenberg-marquardt.ts; Marquardt damping, Nielsen's
 * update): the alternative to Adam + L-BFGS in surrogate-training.ts, chosen by
 * `warmStart.method: "levenberg-marquardt"`.
 *
 * Residuals, one per target value (point θ, grid value t_j, species K):
 *     r = (n_K(t_j, θ̂) − w_K(t_j; θ)/χN) / √M,   M the number of values,
 * so Σ r² is the mean square misfit that the first-order fit minimises (its "fit loss").
 * The network is evaluated in float64 by autodiff/jet-mlp64.ts on the same flattened
 * parameters as the tfjs network (ParameterSet order), its Jacobian row by one reverse pass
 * of the value channel per residual. The answer is written back to the tfjs variables
 * (rounded to float32; the float32 forward pass then differs from the float64 one by
 * float32 rounding, ~1e-7 of n).
 * Units: t = x/L(θ), n = w/χN dimensionless (w in kT per chain).
 */
import type { SpeciesArrays } from '../physics/fields.js';
import { JetMlp64 } from '../autodiff/jet-mlp64.js';
import type { PointJet } from '../autodiff/jet-mlp64.js';
import { levenbergMarquardtYielding } from '../numerics/levenberg-marquardt.js';
import type { DenseLinearisation, LeastSquaresProblem, LmResult } from '../numerics/levenberg-marquardt.js';
import { loadFloat64Passes } from '../autodiff/float64-passes.js';
import type { ParameterPoint } from './parameter-space.js';
import type { SurrogateFieldNet, ParameterGroup } from './surrogate-networks.js';

export interface FieldTarget {
  point: ParameterPoint;
  w: SpeciesArrays;
}

/** The fit of the field network to target fields as a least-squares problem over its flattened parameters. */
export function fieldFitProblem(field: SurrogateFieldNet, groups: ParameterGroup[], targets: FieldTarget[]): LeastSquaresProblem {
  const rows = field.featureRows(groups);
  const width = field.inputWidth;
  const count = rows.length / width;
  const values = new Float64Array(2 * count);
  let k = 0;
  for (const d of targets) {
    for (let j = 0; j < d.w.A.length; j++, k++) {
      values[2 * k] = d.w.A[j] / d.point.chiN;
      values[2 * k + 1] = d.w.B[j] / d.point.chiN;
    }
  }
  if (k !== count) throw new RangeError(`fieldFitProblem: ${count} feature rows, ${k} target values per species`);
  const spec = field.mlp.spec;
  const mlp = new JetMlp64(spec.inputs, spec.hidden, spec.outputs, spec.activation, 0);
  const m = 2 * count;
  const scale = 1 / Math.sqrt(m);
  const input: PointJet = { v: new Float64Array(width), dx: null, dxx: null, ds: null };
  const seeds = [new Float64Array(8), new Float64Array(8)];
  seeds[0][0] = 1;
  seeds[1][1] = 1;
  const residuals = (x: Float64Array, J: Float64Array | null): Float64Array => {
    const r = new Float64Array(m);
    for (let i = 0; i < count; i++) {
      input.v = rows.subarray(i * width, (i + 1) * width);
      const y = mlp.forward(x, input, 'value');
      r[2 * i] = (y[0] - values[2 * i]) * scale;
      r[2 * i + 1] = (y[1] - values[2 * i + 1]) * scale;
      if (J) {
        for (let c = 0; c < 2; c++) mlp.backward(x, seeds[c], J.subarray((2 * i + c) * mlp.size, (2 * i + c + 1) * mlp.size), scale);
      }
    }
    return r;
  };
  const half = (r: Float64Array) => 0.5 * r.reduce((s, v) => s + v * v, 0);
  return {
    size: mlp.size,
    cost: (x) => half(residuals(x, null)),
    linearise: (x): DenseLinearisation => {
      const J = new Float64Array(m * mlp.size);
      const r = residuals(x, J);
      return { kind: 'dense', cost: half(r), m, J, r };
    },
  };
}

/**
 * Levenberg–Marquardt on the field fit, starting from the network's current parameters and
 * writing the answer back; the mean square misfit (2 · cost) at the end. Stops when asked
 * (`shouldStop`, checked between iterations) with reason 'interrupted'.
 */
export async function fitFieldsLm(
  field: SurrogateFieldNet,
  groups: ParameterGroup[],
  targets: FieldTarget[],
  iterations: number,
  pause: () => Promise<void>,
  shouldStop: () => boolean,
  onIteration?: (iteration: number, loss: number, mu: number) => void,
): Promise<LmResult & { loss: number }> {
  // The jet passes (and the normal matrices) in f64x2 kernels: the JS forms' results, bit for bit.
  await loadFloat64Passes();
  const problem = fieldFitProblem(field, groups, targets);
  const x0 = field.parameters.flatten();
  const r = await levenbergMarquardtYielding(
    problem,
    x0,
    { maxIterations: iterations, damping: 'marquardt', dual: 'never', onIteration: (it) => onIteration?.(it.iteration, 2 * it.cost, it.mu) },
    pause,
    shouldStop,
  );
  field.parameters.unflatten(r.x);
  return { ...r, loss: 2 * r.cost };
}

/**
 * Warm start: fit the networks to given targets by least squares before physics training.
 * From the spectral reference this places the networks on the ordered branch, so physics
 * training cannot slide into the disordered trap (docs/physics.md); from a cosine guess it
 * gives an ordered initial field only (a "cold start", whose collapse is then detected).
 *
 * Targets: w_A, w_B on the reference x grid (scaled by max(1, χN)², like the field terms),
 * and ln q, ln q† at the reference's ns + 1 contour points: every k-th, k = max(1, ⌊ns/64⌋), and
 * the last. That is all of them up to ns = 127 and 65 to 128 rows beyond; the shipped results were
 * measured with this choice, so a sparser one would have to be measured again.
 */
import type * as TfModule from '@tensorflow/tfjs';
import type { SpeciesArrays } from '../physics/fields.js';
import type { ScftSolution } from '../physics/result.js';
import { Adam } from '../autodiff/adam.js';
import { runToEnd, runYielding } from '../numerics/stepwise.js';
import type { Stepwise } from '../numerics/stepwise.js';
import { yieldToEvents } from '../runtime/stop.js';
import type { Tf } from '../autodiff/tf.js';
import type { ParameterSet } from '../autodiff/parameters.js';
import { linearLeastSquares } from '../numerics/dense-solve.js';
import { InputError } from '../io/errors.js';
import { cellFeatureArrays } from './features.js';
import type { FieldNet } from './field-net.js';
import type { PropagatorNet, PropagatorPoints } from './propagator-net.js';
import type { ScftNetworks } from './scft-networks.js';

export interface WarmStartTargets {
  x: Float64Array;
  w: SpeciesArrays;
  chiN: number;
  /** Reference propagators on uniform contour points; omitted to fit the field only. */
  propagators?: ScftSolution['propagators'];
}

export interface WarmStartResult {
  /** Steps that ran. */
  steps: number;
  finalLoss: number;
  seconds: number;
  /** Stopped early by a stop request (warmStartYielding). */
  interrupted?: boolean;
}

interface PropagatorTarget {
  net: PropagatorNet;
  points: PropagatorPoints;
  target: TfModule.Tensor;
}

function propagatorTarget(tf: Tf, net: PropagatorNet, x: Float64Array, s: Float64Array, q: Float64Array[]): PropagatorTarget {
  const stride = Math.max(1, Math.floor((s.length - 1) / 64));
  const rows: number[] = [];
  for (let i = 0; i < s.length; i += stride) rows.push(i);
  if (rows[rows.length - 1] !== s.length - 1) rows.push(s.length - 1);
  const nx = x.length;
  const xs = new Float64Array(rows.length * nx);
  const ss = new Float64Array(rows.length * nx);
  const t = new Float32Array(rows.length * nx);
  rows.forEach((i, r) => {
    for (let j = 0; j < nx; j++) {
      xs[r * nx + j] = x[j];
      ss[r * nx + j] = s[i];
      t[r * nx + j] = Math.log(q[i][j]);
    }
  });
  return { net, points: net.prepare(xs, ss, false), target: tf.keep(tf.tensor2d(t, [t.length, 1])) };
}

export function warmStart(tf: Tf, nets: ScftNetworks, targets: WarmStartTargets, steps: number, learningRate: number, onStep?: (step: number, loss: number) => void, params: ParameterSet = nets.parameters): WarmStartResult {
  return runToEnd(warmStartSteps(tf, nets, targets, steps, learningRate, onStep, params));
}

/** warmStart with one event-loop turn after every step; `shouldStop()` true ends it there (`steps` says how many ran, `interrupted` is set). */
export function warmStartYielding(tf: Tf, nets: ScftNetworks, targets: WarmStartTargets, steps: number, learningRate: number, onStep: ((step: number, loss: number) => void) | undefined, shouldStop: () => boolean): Promise<WarmStartResult> {
  return runYielding(warmStartSteps(tf, nets, targets, steps, learningRate, onStep), yieldToEvents, shouldStop);
}

/** The Adam steps of a warm start, one yield after each (numerics/stepwise.ts; the answer false stops it). */
function* warmStartSteps(tf: Tf, nets: ScftNetworks, targets: WarmStartTargets, steps: number, learningRate: number, onStep?: (step: number, loss: number) => void, params: ParameterSet = nets.parameters): Stepwise<number, WarmStartResult> {
  const t0 = performance.now();
  const scale = 1 / Math.max(1, targets.chiN) ** 2;
  const nx = targets.x.length;
  const feats = nets.field ? nets.field.features(targets.x, false) : null;
  const wTarget = nets.field ? tf.keep(tf.tensor2d(Float32Array.from({ length: 2 * nx }, (_, k) => (k % 2 === 0 ? targets.w.A[k >> 1] : targets.w.B[k >> 1])), [nx, 2])) : null;
  const props: PropagatorTarget[] = [];
  if (targets.propagators) {
    const p = targets.propagators;
    props.push(propagatorTarget(tf, nets.q, targets.x, p.s, p.q));
    if (!nets.shared) props.push(propagatorTarget(tf, nets.qDagger, targets.x, p.s, p.qDagger));
  }
  const adam = new Adam(tf, params);
  const vars = params.variables();
  let finalLoss = Number.NaN;
  let ran = 0;
  let interrupted = false;
  for (let step = 1; step <= steps; step++) {
    const lossValue = tf.tidy(() => {
      const { value, grads } = tf.variableGrads(() => {
        let loss = tf.scalar(0);
        if (feats && wTarget) loss = tf.add(loss, tf.mul(tf.mean(tf.square(tf.sub(nets.field!.forward(feats).v, wTarget))), scale));
        for (const pt of props) loss = tf.add(loss, tf.mean(tf.square(tf.sub(pt.net.logQ(pt.points).v, pt.target))));
        return loss as TfModule.Scalar;
      }, vars);
      adam.apply(grads, learningRate);
      return value.dataSync()[0];
    });
    finalLoss = lossValue;
    ran = step;
    onStep?.(step, lossValue);
    if (step < steps && (yield step) === false) {
      interrupted = true;
      break;
    }
  }
  adam.dispose();
  // A field network without hidden layers is linear in its parameters: its least-squares fit
  // is solved exactly rather than left where the Adam steps ended.
  if (nets.field && nets.field.config.hidden.length === 0 && params.variables().includes(nets.field.mlp.layers[0].kernel)) {
    fitLinearField(nets.field, targets.x, targets.w);
  }
  feats?.dispose();
  wTarget?.dispose();
  for (const pt of props) {
    pt.points.dispose();
    pt.target.dispose();
  }
  return { steps: ran, finalLoss, seconds: (performance.now() - t0) / 1000, ...(interrupted ? { interrupted } : {}) };
}

/**
 * The exact least-squares fit of a field network with no hidden layers, w_c(x) = Σ_i f_i(x) K_ic + b_c
 * (f: its periodic features), to w on the grid x, by the normal equations in float64; the
 * result is written to the network's (float32) variables.
 */
export function fitLinearField(field: FieldNet, x: Float64Array, w: SpeciesArrays): void {
  const layer = field.mlp.layers[0];
  // The features of the network's own cell (a film: cosines and the two wall profiles).
  const f = cellFeatureArrays(x, field.cell.features, field.config.fourierModes);
  const p = f.width + 1;
  // The network's outputs get the film's surface-field offsets (−h, +h) added after the layer
  // (field-net.ts), so the layer is fitted to w minus those offsets; fitting w itself would
  // count the wall's field twice.
  const offset = field.offsetAt(x);
  const smooth = offset ? [Float64Array.from(w.A, (v, j) => v - offset[0][j]), Float64Array.from(w.B, (v, j) => v - offset[1][j])] : [w.A, w.B];
  const fill = (j: number, row: Float64Array) => {
    row.set(f.v.subarray(j * f.width, (j + 1) * f.width));
    row[f.width] = 1;
  };
  let coef = linearLeastSquares(x.length, p, fill, smooth);
  if (!coef[0] || !coef[1]) {
    // Nearly dependent columns (a film's wall profiles are close to combinations of the higher
    // cosines on a coarse grid, or more columns than points): any least-squares solution fits
    // as well, so take the one a tiny ridge picks: rows √ε·I with zero targets, ε = 1e-10·nx,
    // about 1e-10 of each column's sum of squares (the fit moves by about that fraction). Only
    // when the plain normal equations fail, so every fit they determine is unchanged.
    const ridge = Math.sqrt(1e-10 * x.length);
    const rowOf = (j: number, row: Float64Array) => {
      if (j < x.length) fill(j, row);
      else {
        row.fill(0);
        row[j - x.length] = ridge;
      }
    };
    const padded = smooth.map((y) => Float64Array.from({ length: x.length + p }, (_, j) => (j < x.length ? y[j] : 0)));
    coef = linearLeastSquares(x.length + p, p, rowOf, padded);
  }
  if (!coef[0] || !coef[1]) {
    // A config choice, not a bug: more columns than the grid can determine.
    throw new InputError(
      `networks.field.fourierModes: got ${field.config.fourierModes}; a field network with no hidden layers has ${p} columns here (modes${f.width > field.config.fourierModes * (field.cell.features.kind === 'fourier' ? 2 : 1) ? ', wall profiles' : ''} and a constant), which the ${x.length}-point grid does not determine; allowed: fewer modes or more grid points (cell.nx, collocation.nx)`,
    );
  }
  const outputs = field.options.outputs;
  const kernel = new Float32Array(f.width * outputs);
  const bias = new Float32Array(outputs);
  for (let c = 0; c < Math.min(outputs, 2); c++) {
    for (let i = 0; i < f.width; i++) kernel[i * outputs + c] = coef[c]![i];
    bias[c] = coef[c]![f.width];
  }
  const tf = field.tf;
  tf.tidy(() => {
    layer.kernel.assign(tf.tensor2d(kernel, [f.width, outputs]));
    layer.bias.assign(tf.tensor1d(bias));
  });
}

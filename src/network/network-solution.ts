/**
 * A trained network as an ScftSolution on a given grid, so it is judged exactly like the
 * reference: in the networks' cell (periodic or film), φ by Simpson quadrature in float64 of the network propagators (evaluated in
 * float32) on `nodesPerBlock` nodes per block, normalised by mean q(x, 1); w from the field
 * network (or the prescribed fields); F from physics/scft-equations.ts.
 *
 * Q and F: mean q(x, 1) carries the networks' MDE residual integrated along the whole
 * contour, first order in it, and F read from it and the densities inherits that (measured on
 * the χN = 15 recipe: −ln Q off by 3.2e-4, F by −1.7e-4 kT at φ_A 8.4e-5). With the exact
 * forms of the propagator constraints, Q is therefore corrected by the networks' own MDE
 * residual in float64 (network/partition-function.ts, the adjoint correction: second order in
 * the propagators' errors; Q from q's end, QDagger from q†'s) and F is the field form
 * (fieldFormFreeEnergy: from w and Q, stationary in w), so neither the densities' error nor
 * the uncorrected Q enters it (the same run: F off by −1.0e-6 kT). The residual is integrated
 * on the same `nodesPerBlock` nodes: the networks fit the MDE at their collocation nodes and
 * not between them, so the nodes must be finer than training's (16 per block gave −3.2e-4 kT,
 * 32 −2.9e-5, 64 −1.0e-6 on that run).
 */
import type { SystemSpec } from '../physics/chain-schema.js';
import { PeriodicCell } from '../physics/cell/periodic-cell.js';
import type { Cell } from '../physics/cell/cell.js';
import { contourFromSteps, densitiesFromPropagators } from '../physics/contour.js';
import { externalFields } from '../physics/fields.js';
import type { SpeciesArrays } from '../physics/fields.js';
import type { ScftSolution } from '../physics/result.js';
import { fieldDeviation } from '../physics/scft-equations.js';
import { buildSolution, DISORDER_SPREAD, spreadOf } from '../physics/solution-record.js';
import type { Tf } from '../autodiff/tf.js';
import type { PropagatorNet } from './propagator-net.js';
import type { ScftNetworks } from './scft-networks.js';
import { ScftResidualSystem } from './least-squares/scft-residual-system.js';
import { correctedPartitionFunction } from './partition-function.js';
import type { CorrectedPartitionFunction } from './partition-function.js';

function logQOnGrid(tf: Tf, net: PropagatorNet, x: Float64Array, s: Float64Array): Float64Array[] {
  const nx = x.length;
  const xs = new Float64Array(s.length * nx);
  const ss = new Float64Array(s.length * nx);
  for (let i = 0; i < s.length; i++)
    for (let j = 0; j < nx; j++) {
      xs[i * nx + j] = x[j];
      ss[i * nx + j] = s[i];
    }
  const pts = net.prepare(xs, ss, false);
  // Read the data outside tf.tidy: tidy walks a returned typed array element by element.
  const t = tf.tidy(() => net.logQ(pts).v);
  const flat = t.dataSync() as Float32Array;
  t.dispose();
  pts.dispose();
  return Array.from({ length: s.length }, (_, i) => Float64Array.from(flat.subarray(i * nx, (i + 1) * nx)));
}


function keptPropagators(tf: Tf, nets: ScftNetworks, x: Float64Array, s: Float64Array | undefined, nodes: Float64Array, u: Float64Array[], ud: Float64Array[]) {
  if (!s) return { s: nodes, q: u.map((r) => r.map(Math.exp)), qDagger: ud.map((r) => r.map(Math.exp)) };
  const exp = (rows: Float64Array[]) => rows.map((r) => r.map(Math.exp));
  return { s, q: exp(logQOnGrid(tf, nets.q, x, s)), qDagger: exp(logQOnGrid(tf, nets.qDagger, x, s)) };
}

export interface NetworkSolutionOptions {
  /** Put the lamella in the phase convention (default); off for the trainer's own field updates. */
  placeInConvention?: boolean;
  periods: number;
  nx: number;
  nodesPerBlock: number;
  keepPropagators?: boolean;
  /** Contour points on which to keep the propagators (default: the quadrature nodes); pass the reference's to compare them point by point. */
  propagatorS?: Float64Array;
  /**
   * Correct Q by the MDE residual and take F in its field form (default; see the header).
   * Off where only the densities are read (the trainer's own field updates), to save its cost.
   */
  correctQ?: boolean;
}

/** Largest relative change of Q the first-order correction is trusted with (common practice, no source: a correction of the size of the value is no longer small). */
const MAX_Q_CORRECTION = 0.5;

function correctionApplies(c: CorrectedPartitionFunction, endQ: number): boolean {
  return [c.fromQ, c.fromQDagger].every((v) => Number.isFinite(v) && v > 0 && Math.abs(v / endQ - 1) <= MAX_Q_CORRECTION);
}

/** The adjoint-corrected Q on the evaluation grid, or null where the float64 residual system does not apply (soft constraints). */
function correctedQ(nets: ScftNetworks, system: SystemSpec, cell: Cell, nodesPerBlock: number): CorrectedPartitionFunction | null {
  const c = nets.q.config;
  if (c.periodicity !== 'exact' || c.initialCondition !== 'exact' || nodesPerBlock % 2 !== 0) return null;
  const unit = { mde: 1, periodicity: 0, initial: 0, incompressibility: 0, selfConsistency: 0, gauge: 0 };
  const sys = new ScftResidualSystem(nets, system, { nx: cell.n, nodesPerBlock }, unit);
  const { sides } = sys.propagatorResiduals(nets.parameters.flatten());
  return correctedPartitionFunction(sides[0], sides[1], (u) => cell.mean(u));
}

export function networkSolution(tf: Tf, nets: ScftNetworks, system: SystemSpec, opts: NetworkSolutionOptions): ScftSolution {
  const t0 = performance.now();
  // The networks' own cell on nx points (a periodic cell holding opts.periods lamellar periods).
  const cell: Cell = nets.cell.kind === 'periodic' ? new PeriodicCell(nets.length, opts.nx, opts.periods) : nets.cell.withPoints(opts.nx);
  const x = cell.x;
  const steps = nets.chain.blocks.map(() => opts.nodesPerBlock);
  const contour = contourFromSteps(nets.chain, steps);
  const contourR = contourFromSteps(nets.reversed, [...steps].reverse());
  const u = logQOnGrid(tf, nets.q, x, contour.s);
  const ud = logQOnGrid(tf, nets.qDagger, x, contourR.s);
  const nn = contour.s.length;
  const nx = opts.nx;
  const q = u.map((r) => r.map(Math.exp));
  const qd = ud.map((r) => r.map(Math.exp));
  const endQ = cell.mean(q[nn - 1]);
  const phi = densitiesFromPropagators(contour, q, qd, endQ);
  const candidate = opts.correctQ === false ? null : correctedQ(nets, system, cell, opts.nodesPerBlock);
  // The correction is first order in the residual: it holds for a trained network, not for one
  // a few steps old, whose corrected Q can come out negative (F = NaN). Then Q is read off the end.
  const corrected = candidate && correctionApplies(candidate, endQ) ? candidate : null;
  const Q = corrected ? corrected.fromQ : endQ;
  const QDagger = corrected ? corrected.fromQDagger : cell.mean(qd[nn - 1]);
  let w: SpeciesArrays;
  const fixed = externalFields(system, cell);
  if (nets.field) {
    const feats = nets.field.features(x, false);
    const t = tf.tidy(() => nets.field!.forward(feats).v);
    const out = t.dataSync() as Float32Array;
    t.dispose();
    feats.dispose();
    w = { A: new Float64Array(nx), B: new Float64Array(nx) };
    for (let j = 0; j < nx; j++) {
      w.A[j] = out[2 * j];
      w.B[j] = out[2 * j + 1];
    }
  } else {
    w = fixed ?? { A: new Float64Array(nx), B: new Float64Array(nx) };
  }
  const notes: string[] = [];
  const amplitude = spreadOf(phi.A);
  if (!fixed && nets.chain.species.length > 1 && amplitude < DISORDER_SPREAD.network) {
    notes.push(`the network collapsed to the homogeneous (disordered) state: φ_A varies by only ${amplitude.toExponential(2)}`);
  }
  notes.push(`φ by Simpson quadrature on ${opts.nodesPerBlock} contour intervals per block`);
  if (corrected) notes.push(`Q corrected by the networks' MDE residual (adjoint correction; read off q(x, 1): ${endQ.toPrecision(10)}), F in its field form`);
  else if (candidate) notes.push(`Q read off q(x, 1): the networks' MDE residual is too large for the adjoint correction (it gave Q = ${candidate.fromQ.toPrecision(4)} against ${endQ.toPrecision(4)})`);
  // The network's own SCFT residual max |w_out − w_in| (kT), as the spectral solver reports it.
  const residual = fixed ? 0 : fieldDeviation(nets.chain, system.chiN, w, phi, cell).residual;
  const propagators = opts.keepPropagators ? keptPropagators(tf, nets, x, opts.propagatorS, contour.s, u, ud) : undefined;
  const sol = buildSolution({
    solver: 'network',
    system,
    chain: nets.chain,
    cell,
    contour,
    w,
    phi,
    Q,
    QDagger,
    prescribedFields: Boolean(fixed),
    iterations: 0,
    residual,
    converged: true,
    seconds: (performance.now() - t0) / 1000,
    notes,
    propagators,
    disorderSpread: DISORDER_SPREAD.network,
    placeInConvention: opts.placeInConvention,
    freeEnergyForm: corrected ? 'fields' : 'densities',
  });
  // ns describes the contour grid of the stored propagators when they are kept on the reference's.
  if (opts.keepPropagators && opts.propagatorS) sol.ns = opts.propagatorS.length - 1;
  return sol;
}

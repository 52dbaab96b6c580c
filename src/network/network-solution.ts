/**
 * A trained network as an ScftSolution on a given grid, so it is judged exactly like the
 * reference: in the networks' cell (periodic or film), φ by Simpson quadrature in float64 of the network propagators (evaluated in
 * float32) on `nodesPerBlock` nodes per block, Q = mean q(x, 1), w from the field network
 * (or the prescribed fields), F from physics/scft-equations.ts.
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
  const Q = cell.mean(q[nn - 1]);
  const QDagger = cell.mean(qd[nn - 1]);
  const phi = densitiesFromPropagators(contour, q, qd, Q);
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
  });
  // ns describes the contour grid of the stored propagators when they are kept on the reference's.
  if (opts.keepPropagators && opts.propagatorS) sol.ns = opts.propagatorS.length - 1;
  return sol;
}

/**
 * A trained network as an ScftSolution on a given grid, so it is judged exactly like the
 * reference: φ by Simpson quadrature in float64 of the network propagators (evaluated in
 * float32) on `nodesPerBlock` nodes per block, Q = mean q(x, 1), w from the field network
 * (or the prescribed fields), F from physics/scft-equations.ts.
 */
import type { SystemSpec } from '../physics/chain-schema.js';
import { disorderedFreeEnergy } from '../physics/chain.js';
import { externalFields } from '../physics/fields.js';
import type { SpeciesArrays } from '../physics/fields.js';
import { cellMean, spreadOf } from '../physics/grid.js';
import type { Phase, ScftSolution } from '../physics/result.js';
import { fieldDeviation, freeEnergy } from '../physics/scft-equations.js';
import type { Tf } from '../autodiff/tf.js';
import { contourNodes, gridX } from './contour-nodes.js';
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

/**
 * A network's φ_A is only accurate to ~1e-3–1e-2, so the spectral threshold (1e-5) cannot
 * be used: below a spread of 0.02 we call it disordered. Even close to the ODT a converged
 * lamella has a much larger spread (0.2 at χN = 10.6 for f = 0.5, tests/spectral).
 */
export const NETWORK_DISORDER_AMPLITUDE = 0.02;

function keptPropagators(tf: Tf, nets: ScftNetworks, x: Float64Array, s: Float64Array | undefined, nodes: Float64Array, u: Float64Array[], ud: Float64Array[]) {
  if (!s) return { s: nodes, q: u.map((r) => r.map(Math.exp)), qDagger: ud.map((r) => r.map(Math.exp)) };
  const exp = (rows: Float64Array[]) => rows.map((r) => r.map(Math.exp));
  return { s, q: exp(logQOnGrid(tf, nets.q, x, s)), qDagger: exp(logQOnGrid(tf, nets.qDagger, x, s)) };
}

export interface NetworkSolutionOptions {
  periods: number;
  nx: number;
  nodesPerBlock: number;
  keepPropagators?: boolean;
  /** Contour points on which to keep the propagators (default: the quadrature nodes); pass the reference's to compare them point by point. */
  propagatorS?: Float64Array;
}

export function networkSolution(tf: Tf, nets: ScftNetworks, system: SystemSpec, opts: NetworkSolutionOptions): ScftSolution {
  const t0 = performance.now();
  const x = gridX(nets.length, opts.nx);
  const nodes = contourNodes(nets.chain, opts.nodesPerBlock);
  const nodesR = contourNodes(nets.reversed, opts.nodesPerBlock);
  const u = logQOnGrid(tf, nets.q, x, nodes.s);
  const ud = logQOnGrid(tf, nets.qDagger, x, nodesR.s);
  const nn = nodes.s.length;
  const nx = opts.nx;
  const Q = cellMean(u[nn - 1].map(Math.exp));
  const QDagger = cellMean(ud[nn - 1].map(Math.exp));
  const phi: SpeciesArrays = { A: new Float64Array(nx), B: new Float64Array(nx) };
  for (let i = 0; i < nn; i++) {
    const cA = nodes.weights.A[i];
    const cB = nodes.weights.B[i];
    const a = u[i];
    const b = ud[nn - 1 - i];
    for (let j = 0; j < nx; j++) {
      const p = Math.exp(a[j] + b[j]) / Q;
      phi.A[j] += cA * p;
      phi.B[j] += cB * p;
    }
  }
  let w: SpeciesArrays;
  const fixed = externalFields(system, { length: nets.length, nx });
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
  const amplitude = spreadOf(phi.A);
  const species = nets.chain.species.length;
  const notes: string[] = [];
  let phase: Phase;
  if (fixed) phase = 'single-chain';
  else if (species === 1) phase = 'homogeneous-melt';
  else if (amplitude < NETWORK_DISORDER_AMPLITUDE) {
    phase = 'disordered';
    notes.push(`the network collapsed to the homogeneous (disordered) state: φ_A varies by only ${amplitude.toExponential(2)}`);
  } else phase = 'lamellar';
  // ns describes the contour grid of the stored propagators when they are kept on the reference's.
  const ns = (opts.keepPropagators && opts.propagatorS ? opts.propagatorS.length : nn) - 1;
  notes.push(`φ by Simpson quadrature on ${opts.nodesPerBlock} contour intervals per block`);
  // The network's own SCFT residual max |w_out − w_in| (kT), as the spectral solver reports it.
  const residual = fixed ? 0 : fieldDeviation(nets.chain, system.chiN, w, phi).residual;
  return {
    solver: 'network',
    system,
    length: nets.length,
    periods: opts.periods,
    period: nets.length / opts.periods,
    nx,
    ns,
    x,
    phi,
    w,
    Q,
    QDagger,
    freeEnergy: fixed ? -Math.log(Q) : freeEnergy(system.chiN, Q, w, phi),
    freeEnergyDisordered: fixed ? Number.NaN : disorderedFreeEnergy(nets.chain, system.chiN),
    phase,
    amplitude,
    iterations: 0,
    residual,
    converged: true,
    seconds: (performance.now() - t0) / 1000,
    propagators: opts.keepPropagators ? keptPropagators(tf, nets, x, opts.propagatorS, nodes.s, u, ud) : undefined,
    notes,
  };
}

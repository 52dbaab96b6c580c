/**
 * One seed of the network χN estimator: networks built and started from the spectral
 * solution at a starting χN, then χN found with the networks as one least-squares problem
 * (inverse/network-least-squares.ts), all in float64 by Levenberg–Marquardt
 * (numerics/levenberg-marquardt.ts, Nielsen's damping update):
 *
 *   1. start: the field network fitted to the spectral w_A, w_B at the starting χN (least
 *      squares over its own parameters), then each propagator network fitted to the MDE in
 *      those fields (its own columns: q and q† are independent there), so the joint problem
 *      starts near the ordered solution at the starting χN;
 *   2. cycles, each one LM iteration of the joint problem (every network parameter and χN, on
 *      the SCFT residuals and the data rows; χN held for the first cycles), then a few LM
 *      iterations of each propagator alone on its MDE in the fields just found.
 *
 * Why the cycles: χN enters only the self-consistency rows, so while the propagators still
 * carry an MDE residual the joint step lowers it partly by moving χN, and χN comes back only as
 * fast as that residual falls. A joint iteration costs the whole normal matrix (about 1200
 * columns); a propagator's own iteration about a sixth of it, on half the columns, and it
 * lowers exactly that residual. Measured on the noiseless bench case (docs/inverse.md,
 * "Joint and propagator iterations in cycles"): χN within 1e-3 after about 20 cycles, where the
 * joint iteration alone needed about 75 iterations at the same cost each.
 *
 * The data rows pin the ordered profile, so the joint iteration cannot slide to another
 * discrete solution of the network system (the forward joint LM does from a warm start:
 * docs/second-order-training.md); the run checks it (the φ_A amplitude against the start).
 * With FrameData.split they pin it along the classical fit's directions, and the profile's
 * shape beyond them by the data's noise against the networks' accuracy
 * (network-least-squares.ts, DataRows.split; network-estimator.ts, dataSplit).
 *
 * Units: x in Rg (model frame), w and χN in kT per chain.
 */
import type { ChainSpec } from '../physics/chain-schema.js';
import { buildChain } from '../physics/chain.js';
import { PeriodicCell } from '../physics/cell/periodic-cell.js';
import { conventionShift } from '../physics/phase-convention.js';
import type { ScftSolution } from '../physics/result.js';
import { trainConfigSchema } from '../io/schemas/train-config.js';
import type { Tf } from '../autodiff/tf.js';
import { buildScftNetworks } from '../network/scft-networks.js';
import { ScftResidualSystem } from '../network/least-squares/scft-residual-system.js';
import { levenbergMarquardt } from '../numerics/levenberg-marquardt.js';
import type { LmStop } from '../numerics/levenberg-marquardt.js';
import { NetworkInverseProblem } from './network-least-squares.js';

/** x points of the aliasing check per residual-grid point. */
const ALIAS_CHECK = 4;

export interface JointFitSettings {
  chain: ChainSpec;
  seed: number;
  /** Hidden layers of the field network and of each propagator piece. */
  fieldHidden: number[];
  propagatorHidden: number[];
  /** Residual grid: cell points and contour steps per block. */
  nx: number;
  nodesPerBlock: number;
  /** LM iterations of the field-network start fit and of each propagator's start fit. */
  fieldStartIterations: number;
  propagatorStartIterations: number;
  /** LM iterations of each propagator on its MDE in the fitted fields, before the joint problem. */
  mdeStartIterations: number;
  /** Cycles with χN free (each one joint LM iteration, then the propagators' own iterations). */
  iterations: number;
  /** λ of the data rows. */
  dataWeight: number;
  /** Cycles with χN held at the start before it is freed (the networks settle on the physics first). */
  holdChiNIterations?: number;
  /** LM iterations of each propagator on its own MDE after each joint iteration (0: joint iterations only). */
  propagatorIterations?: number;
  /** First LM damping of the joint problem, relative to max diag(JᵀJ). */
  tau?: number;
  /**
   * The period as a parameter beside χN (a free period: the classical fit's period mode "free"),
   * started at the given one; otherwise held there. Needs the data's unwrapped positions
   * (FrameData.u).
   */
  fitPeriod?: boolean;
  /** Gaussian resolution of the data (Rg), applied to the model before the misfit. */
  resolution: number;
  shouldStop?: () => boolean;
  onIteration?: (iteration: number, chiN: number, cost: number, mu: number) => void;
}

export interface JointFitResult {
  chiN: number;
  /** The cell length (period, Rg) of the fit: the one given unless fitPeriod. */
  period: number;
  /**
   * Where the networks put the A-rich domain's centre, in the start's frame (Rg): the shift of
   * the phase convention (physics/phase-convention.ts). The networks translate freely, so the data rows set it: the offset
   * of the data is the start's plus this.
   */
  shift: number;
  trajectory: { step: number; chiN: number }[];
  /** RMS of network φ_A − data at the data points. */
  rmsResidual: number;
  /** w_A − w_B of the network on `exchangeGrid` (kT), with its A-rich domain centred at 0. */
  exchange: Float64Array;
  /** SCFT loss (Σ r² of the physics rows) at the start of the joint problem and at its end. */
  lossStart: number;
  lossEnd: number;
  /** φ_A amplitude (max − min) of the network at the end over the start's: near 1 when the ordered profile held. */
  amplitudeRatio: number;
  /**
   * The propagators' MDE mean square at the end on the residual grid and on ALIAS_CHECK × its
   * x points at the same contour nodes: a ratio far above 1 means the networks fit the MDE at
   * the grid points and not between them (aliasing in x, docs/second-order-training.md).
   */
  mdeOnGrid: number;
  mdeBetween: number;
  iterations: number;
  reason: LmStop | 'interrupted';
  seconds: { start: number; joint: number };
}

/** Data positions in the model frame and the data themselves. */
export interface FrameData {
  /** Positions in the model frame, t = (x − x0) mod L. */
  t: Float64Array;
  /** x − x0 unwrapped (needed with a free period: a stretched cell moves the points by their distance from x0). */
  u?: Float64Array;
  phi: Float64Array;
  sigma?: Float64Array;
  /** The data rows split along the classical fit's directions (DataRows.split). */
  split?: { directions: Float64Array[]; shapeWeight: number };
}

function amplitude(v: Float64Array): number {
  let lo = Infinity;
  let hi = -Infinity;
  for (const x of v) {
    lo = Math.min(lo, x);
    hi = Math.max(hi, x);
  }
  return hi - lo;
}

export function jointFitSeed(tf: Tf, start: ScftSolution, chiNStart: number, period: number, data: FrameData, s: JointFitSettings, exchangeGrid: Float64Array): JointFitResult {
  const t0 = performance.now();
  const chain = buildChain(s.chain);
  const config = trainConfigSchema.parse({
    version: 2,
    kind: 'train',
    system: { chain: s.chain, chiN: chiNStart },
    cell: { period, nx: start.nx, ns: start.ns },
    networks: { field: { hidden: s.fieldHidden, seed: s.seed }, propagator: { hidden: s.propagatorHidden, seed: s.seed + 101 } },
    collocation: { nx: s.nx, nodesPerBlock: s.nodesPerBlock, random: 0 },
  });
  const nets = buildScftNetworks(tf, config, chain, period, true);
  try {
    const system = { chain: s.chain, chiN: chiNStart };
    const sys = new ScftResidualSystem(nets, system, { nx: s.nx, nodesPerBlock: s.nodesPerBlock }, config.losses.weights);
    let theta = nets.parameters.flatten();
    // 1. The field network fitted to the spectral fields (resampled to the residual grid).
    const wTarget = { A: start.cell.resample(start.w.A, s.nx), B: start.cell.resample(start.w.B, s.nx) };
    const fit = sys.fieldFit(theta, wTarget);
    const rf = levenbergMarquardt(fit, theta.slice(fit.first, fit.first + fit.size), { maxIterations: s.fieldStartIterations });
    theta.set(rf.x, fit.first);
    // Each propagator network fitted to the reference's ln q (a well-posed regression: a few
    // LM iterations), then to the MDE in the fitted fields (its own columns only).
    const sides: ('q' | 'qDagger')[] = nets.shared ? ['q'] : ['q', 'qDagger'];
    const props = start.propagators;
    if (!props) throw new Error('jointFitSeed: the start solution carries no propagators');
    for (const side of sides) {
      const target = logQTargets(start, side, sys.contourOf(side), s.nx);
      const pf = sys.propagatorFit(theta, side, target);
      const rv = levenbergMarquardt(pf, theta.slice(pf.first, pf.first + pf.size), { maxIterations: s.propagatorStartIterations, damping: 'identity', dual: 'never', onIteration: () => !s.shouldStop?.() });
      theta.set(rv.x, pf.first);
    }
    for (const side of sides) {
      if (s.mdeStartIterations <= 0) break;
      const problem = sys.partProblem(theta, side);
      const r = levenbergMarquardt(
        problem,
        theta.slice(problem.first, problem.first + problem.size),
        { maxIterations: s.mdeStartIterations, onIteration: () => !s.shouldStop?.() },
      );
      theta = problem.embed(r.x);
    }
    const tStart = (performance.now() - t0) / 1000;
    // 2. The joint problem: every parameter and χN, physics and data rows.
    const grid = new PeriodicCell(period, s.nx, 1);
    // A free period: the cell stretched from `period` (L₀) to L with the networks fixed in x/L,
    // so the data at x − x0 = u sit at u L₀/L on the residual grid, and the blur scales alike.
    const u = data.u;
    if (s.fitPeriod && !u) throw new Error('jointFitSeed: a free period needs the unwrapped positions (FrameData.u)');
    const stretched = (L: number) => grid.interpolationMatrix(Float64Array.from(u!, (v) => (v * period) / L), (s.resolution * period) / L);
    const problem = new NetworkInverseProblem(sys, { matrix: grid.interpolationMatrix(data.t, s.resolution), phi: data.phi, sigma: data.sigma, ...(data.split ? { split: data.split } : {}), ...(s.fitPeriod ? { period: { length: period, matrixAt: stretched } } : {}) }, chiNStart, s.dataWeight);
    const x0 = problem.join(theta, chiNStart);
    const e0 = problem.evaluate(x0);
    const physicsLoss = (e: ReturnType<typeof problem.evaluate>) => {
      const W = sys.weights;
      return W.mde * e.terms.mde + W.incompressibility * e.terms.incompressibility + W.selfConsistency * e.terms.selfConsistency + W.gauge * e.terms.gauge;
    };
    sys.chiN = chiNStart;
    const amp0 = amplitude(sys.state(theta).phi.A);
    const trajectory = [{ step: 0, chiN: chiNStart }];
    let interrupted = false;
    const held = s.holdChiNIterations ?? 0;
    const cycles = held + s.iterations;
    const own = s.propagatorIterations ?? 0;
    // μ carried from cycle to cycle: the joint problem's as it ended; each propagator's starts at
    // the smaller of where its last solve started and ended, so a solve that had to raise μ
    // (a rejected step) does not hand the next cycle an ever larger one (measured: one seed's
    // q† climbed to μ ≈ 1e2 over five cycles and stopped moving).
    let muJoint: number | undefined;
    const muOwn = new Map<string, number>();
    let x = x0;
    let done = 0;
    let reason: LmStop = 'maxIterations';
    for (let c = 1; c <= cycles && !interrupted; c++) {
      problem.holdChiN = c <= held;
      const lm = levenbergMarquardt(problem, x, {
        maxIterations: 1,
        tau: s.tau ?? 1e-3,
        ...(muJoint !== undefined ? { initialMu: muJoint } : {}),
        onIteration: (it, xs) => {
          const chiN = xs[xs.length - 1];
          trajectory.push({ step: c, chiN });
          s.onIteration?.(c, chiN, it.cost, it.mu);
          if (s.shouldStop?.()) interrupted = true;
          return !interrupted;
        },
      });
      x = lm.x;
      muJoint = lm.mu;
      done = c;
      reason = lm.reason === 'callback' ? 'maxIterations' : lm.reason;
      if (lm.reason !== 'maxIterations' && lm.reason !== 'callback') break;
      if (own <= 0 || interrupted || c === cycles) continue;
      const cur = problem.split(x);
      let th: Float64Array = Float64Array.from(cur.theta);
      problem.applyState(x);
      for (const side of sides) {
        const part = sys.partProblem(th, side);
        const mu0 = muOwn.get(side);
        const rs = levenbergMarquardt(part, th.slice(part.first, part.first + part.size), {
          maxIterations: own,
          ...(mu0 !== undefined ? { initialMu: mu0 } : {}),
          onIteration: () => !(interrupted ||= s.shouldStop?.() ?? false),
        });
        if (Number.isFinite(rs.mu)) muOwn.set(side, Math.min(rs.mu, mu0 ?? rs.mu));
        th = part.embed(rs.x);
      }
      x = problem.join(th, cur.chiN, cur.length);
    }
    const { theta: thetaEnd, chiN, length } = problem.split(x);
    // (evaluate leaves χN and the cell length of x in the residual system, for what follows.)
    const eEnd = problem.evaluate(x);
    const L = s.fitPeriod ? length : period;
    const state = sys.state(thetaEnd);
    nets.parameters.unflatten(thetaEnd);
    const fine = new ScftResidualSystem(nets, { chain: s.chain, chiN }, { nx: ALIAS_CHECK * s.nx, nodesPerBlock: s.nodesPerBlock }, config.losses.weights);
    fine.lengthFactor = sys.lengthFactor;
    // w_A − w_B on the requested grid: the band-limited interpolant of the residual grid's values.
    const ex = Float64Array.from(state.w.A, (a, j) => a - state.w.B[j]);
    // Read with the networks' own A-rich domain centre (shift) at t = 0, as the classical model
    // places its own; with a free period the cell is stretched to L, so the value at t is the
    // grid's at t L₀/L.
    const shift = conventionShift(grid.withLength(L), state.phi.A);
    const exchange = grid.interpolate(ex, Float64Array.from(exchangeGrid, (t) => ((t + shift) * period) / L));
    return {
      chiN,
      period: L,
      shift,
      trajectory,
      rmsResidual: Math.sqrt(eEnd.misfit),
      exchange,
      lossStart: physicsLoss(e0),
      lossEnd: physicsLoss(eEnd),
      amplitudeRatio: amplitude(state.phi.A) / amp0,
      mdeOnGrid: eEnd.terms.mde,
      mdeBetween: fine.evaluate(thetaEnd, false, 'q').terms.mde + (nets.shared ? 0 : fine.evaluate(thetaEnd, false, 'qDagger').terms.mde),
      iterations: done,
      reason: interrupted ? 'interrupted' : reason,
      seconds: { start: tStart, joint: (performance.now() - t0) / 1000 - tStart },
    };
  } finally {
    nets.dispose();
  }
}

/**
 * ln q of the reference at a side's contour nodes and nx grid points: linear in s between the
 * reference's nodes (its contour is finer), band-limited (Fourier) in x.
 */
function logQTargets(ref: ScftSolution, side: 'q' | 'qDagger', nodes: Float64Array, nx: number): Float64Array[] {
  const p = ref.propagators!;
  const ns = p.s.length - 1;
  // The reversed chain's nodes: s'_k = 1 − s_{ns−k}.
  const src = side === 'q' ? p.s : Float64Array.from(p.s, (_, k) => 1 - p.s[ns - k]);
  const rows = (side === 'q' ? p.q : p.qDagger).map((q) => ref.cell.resample(Float64Array.from(q, Math.log), nx));
  return Array.from(nodes, (s) => {
    let k = 0;
    while (k < ns - 1 && src[k + 1] < s) k++;
    const a = Math.min(1, Math.max(0, (s - src[k]) / (src[k + 1] - src[k])));
    return Float64Array.from(rows[k], (v, j) => (1 - a) * v + a * rows[k + 1][j]);
  });
}

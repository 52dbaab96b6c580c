/**
 * The second-order phase of a train run: Levenberg–Marquardt (numerics/levenberg-marquardt.ts,
 * Nielsen's damping update) on the whole SCFT residual system in float64
 * (network/least-squares/scft-residual-system.ts): the MDE of every propagator, the
 * incompressibility, self-consistency and gauge equations, with the field network trained
 * jointly with the propagators. The normal matrix is assembled from the row groups of the
 * Jacobian (numerics/grouped-normal-equations.ts) and factorised by Cholesky.
 *
 * Strategy 'alternating' (like the L-BFGS cycles of the train loop): LM on each propagator's
 * MDE in the current fields (q and q† independent, so one normal matrix each), then the
 * field network fitted by LM to the simple-mixing SCFT update of the networks' own φ
 * (physics/scft-equations.ts), in float64, repeated;
 * 'joint': LM on everything at once (one normal matrix over all parameters).
 * The networks' tfjs variables (float32) are written only when the state is evaluated,
 * refitted or kept; the iteration itself runs on its float64 copy of the parameters.
 * Loss = Σ r² = the weighted total of losses/terms.ts on the phase's grid (the junction nodes
 * count once per block they bound).
 */
import type { SystemSpec } from '../physics/chain-schema.js';
import type { SpeciesArrays } from '../physics/fields.js';
import type { ScftNetworks } from '../network/scft-networks.js';
import type { LossValues } from '../network/losses/terms.js';
import { ScftResidualSystem } from '../network/least-squares/scft-residual-system.js';
import type { ResidualPart } from '../network/least-squares/scft-residual-system.js';
import { levenbergMarquardt, levenbergMarquardtYielding } from '../numerics/levenberg-marquardt.js';
import { loadFloat64Passes } from '../autodiff/float64-passes.js';
import { yieldToEvents } from '../runtime/stop.js';
import type { LmStop } from '../numerics/levenberg-marquardt.js';
import { fieldDeviation, fixGauge } from '../physics/scft-equations.js';
import { AndersonMixer } from '../spectral/anderson-mixer.js';
import { lamellarPhase, pinLamellarPhase } from '../physics/translation.js';
import { PeriodicCell } from '../physics/cell/periodic-cell.js';
import type { ContourSpread } from '../physics/contour.js';

/** LM iterations of each field-network fit (a small least-squares problem over the field network alone). */
const FIELD_FIT_ITERATIONS = 20;

export interface SecondOrderSettings {
  iterations: number;
  nx: number;
  nodesPerBlock: number;
  /** How the contour steps are spread over the blocks (physics/contour.ts; absent: 'equal'). */
  contourSpread?: ContourSpread;
  damping: 'marquardt' | 'identity';
  /** Evaluate against the reference every this many iterations (0: at the end only). */
  evaluateEvery: number;
  /** Stop once the reference error is below this. */
  targetPhiError?: number;
  /** Stop once the loss is below this. */
  lossTolerance: number;
  /**
   * 'alternating': cycles of (field step, then LM on each propagator's MDE in the current
   * fields: per-propagator normal matrices, the Jacobian being block-diagonal between them);
   * 'joint': LM on the whole system with the field network among the parameters.
   */
  strategy: 'alternating' | 'joint';
  cycles: number;
  /** Alternating: LM iterations of each propagator in the first cycle (0: the same share as the other cycles). */
  firstCycleIterations: number;
  /**
   * Alternating: a propagator's first-cycle LM ends early once its MDE loss fell by less than
   * this fraction over its last 5 iterations (0: never). After a warm start one propagator can
   * be converged in a few iterations while the other needs many (f = 0.35, χN = 22: q's loss
   * flat after 15 of its 40, q†'s still falling fast at 40); the iterations saved go to the
   * later cycles.
   */
  firstCyclePlateau?: number;
  /** Joint iterations after the alternating cycles (on top of `iterations`). */
  jointIterations: number;
  /**
   * Alternating: LM iterations on a propagator's output layers alone before its LM in each
   * cycle (absent or 0: none). For fixed hidden layers the output layer is a small set of
   * columns (17 per 2×16 piece): each such iteration costs the Jacobian's evaluation and a
   * tiny normal matrix, a fraction of a whole propagator's iteration. They are not counted in
   * `iterations`; their time is in the history's seconds.
   */
  outputLayerIterations?: number;
  /**
   * Extra steps per accepted propagator LM step with the same factorisation (Fan's modified
   * LM, numerics/levenberg-marquardt.ts LmOptions.extraSteps); absent or 0: none.
   */
  extraSteps?: number;
  /** λ of the field step's update: w + λ d (simple), or x̄ + λ d̄ (Anderson). */
  fieldMixing: number;
  /**
   * The field step between cycles: 'simple' mixing w + λ d, or 'anderson' mixing over the
   * cycles' (w, d) pairs on the grid (spectral/anderson-mixer.ts), so the outer SCFT
   * iteration converges like the reference solver's instead of at the simple-mixing rate.
   */
  fieldStep: 'simple' | 'anderson';
  /** Pairs kept by the Anderson field step. */
  andersonHistory: number;
  /**
   * The k-th field step (k = 1, 2, …) moves the fields by decay^(k−1) of the move its rule
   * (`fieldStep`) asks for (absent or 1: the whole move). The networks' deviation d carries
   * their propagators' error as well as the fields'; shrinking steps stop that error from
   * moving converged fields (decreasing step sizes: Robbins & Monro, Ann. Math. Stat. 22
   * (1951) 400–407).
   */
  fieldStepDecay?: number;
  /** Lamellar periods in the cell (the harmonic whose phase the field step pins). */
  periods: number;
  /**
   * Contour steps per block of the φ that the field steps read (absent: nodesPerBlock). The
   * networks are evaluated there (values only), so φ's quadrature error need not be that of
   * the collocation nodes: Simpson's rule on 16 steps per block alone costs 4–6e-5 in φ_A
   * (`npm run bench -- --discretisation-floor`), a floor under the fields the steps reach.
   */
  stateNodesPerBlock?: number;
}

export interface SecondOrderProgress {
  iteration: number;
  iterations: number;
  loss: number;
  mu: number;
  /** Iterations per second so far. */
  rate: number;
  secondsLeft: number;
  phiError?: number;
}

export interface SecondOrderRecord {
  iteration: number;
  loss: number;
  terms: LossValues;
  mu: number;
  seconds: number;
  phiError?: number;
}

export interface FieldStepReport {
  cycle: number;
  /** LM iterations done before the step. */
  afterIteration: number;
  /** max |d| (kT) of the networks' SCFT deviation before the step. */
  residual: number;
  /** RMS of the field network's misfit to the step's target (kT) after the refit. */
  fitRms: number;
  /** max |target − w| (kT) over the species and the grid: the move the step asked for (after fieldStepDecay). */
  move: number;
}

export interface SecondOrderHooks {
  onFieldStep?: (r: FieldStepReport) => void;
  /** φ_A relative L2 error of the networks as they are now (their tfjs variables). */
  evaluate?: () => number;
  shouldStop?: () => boolean;
  onProgress?: (p: SecondOrderProgress) => void;
  /** Every iteration, in order (for the run's history). */
  onRecord?: (r: SecondOrderRecord) => void;
}

export interface SecondOrderResult {
  iterations: number;
  loss: number;
  reason: LmStop | 'target-reached' | 'interrupted';
  seconds: number;
  /** The kept state: lowest reference error when evaluated, else lowest loss. */
  best: { iteration: number; loss: number; phiError?: number };
  /** The field steps of the alternating strategy, in order. */
  fieldSteps: FieldStepReport[];
  /** First iteration (and seconds) at which the reference error fell below the target. */
  reachedTarget?: { iteration: number; seconds: number };
}

/**
 * The phase, stoppable after any LM iteration: the event loop turns after each, so a Ctrl-C
 * sets the stop flag there and `hooks.shouldStop()` ends the phase with reason 'interrupted'.
 */
export async function runSecondOrder(nets: ScftNetworks, system: SystemSpec, weights: LossValues, settings: SecondOrderSettings, hooks: SecondOrderHooks = {}): Promise<SecondOrderResult> {
  const t0 = performance.now();
  const seconds = () => (performance.now() - t0) / 1000;
  // The f64x2 kernels of the normal matrices, factorisations and jet passes (the same results
  // as their JS forms, to the last bit, three to four times as fast on the matrices and about
  // 2.7 times on the jets); without them the JS forms run.
  await loadFloat64Passes();
  const sys = new ScftResidualSystem(nets, system, { nx: settings.nx, nodesPerBlock: settings.nodesPerBlock, spread: settings.contourSpread }, weights);
  let theta = nets.parameters.flatten();
  const lossOf = (x: Float64Array) => sys.evaluate(x, false);
  const evaluated = Boolean(hooks.evaluate);
  const target = settings.targetPhiError;
  let best = { iteration: 0, loss: 2 * lossOf(theta).cost, phiError: evaluated ? hooks.evaluate!() : undefined, x: theta };
  let stopped: SecondOrderResult['reason'] | null = null;
  let reachedTarget: SecondOrderResult['reachedTarget'];
  if (best.phiError !== undefined && target !== undefined && best.phiError < target) {
    reachedTarget = { iteration: 0, seconds: 0 };
    stopped = 'target-reached';
  }
  let done = 0;
  const total = settings.iterations + (settings.strategy === 'alternating' ? settings.jointIterations : 0);
  let lastLoss = best.loss;
  let lastReason: LmStop = 'maxIterations';

  /** The common bookkeeping of every LM iteration (any part): history, evaluation, best state, stop. */
  const record = (mu: number, full: Float64Array): boolean => {
    done++;
    const last = done === total;
    let phiError: number | undefined;
    if (evaluated && (last || (settings.evaluateEvery > 0 && done % settings.evaluateEvery === 0))) {
      nets.parameters.unflatten(full);
      phiError = hooks.evaluate!();
    }
    const e = lossOf(full);
    const loss = 2 * e.cost;
    lastLoss = loss;
    const better = evaluated ? phiError !== undefined && !(phiError >= (best.phiError ?? Infinity)) : loss < best.loss;
    if (better) best = { iteration: done, loss, phiError, x: Float64Array.from(full) };
    const t = seconds();
    hooks.onRecord?.({ iteration: done, loss, terms: e.terms, mu, seconds: t, ...(phiError !== undefined ? { phiError } : {}) });
    const rate = done / Math.max(1e-9, t);
    hooks.onProgress?.({ iteration: done, iterations: total, loss, mu, rate, secondsLeft: (total - done) / rate, ...(phiError !== undefined ? { phiError } : {}) });
    if (phiError !== undefined && target !== undefined && phiError < target) {
      reachedTarget = { iteration: done, seconds: t };
      stopped = 'target-reached';
      return false;
    }
    if (hooks.shouldStop?.()) {
      stopped = 'interrupted';
      return false;
    }
    return loss > settings.lossTolerance;
  };

  /**
   * LM on one propagator's output layers alone (settings.outputLayerIterations), stoppable
   * after any of its iterations as the propagators' LM is (a stop there ends the phase).
   */
  const solveOutputLayer = async (side: 'q' | 'qDagger') => {
    const n = settings.outputLayerIterations ?? 0;
    if (n <= 0) return;
    const cols = sys.outputLayerColumns(side);
    const problem = sys.columnProblem(theta, side, cols);
    const r = await levenbergMarquardtYielding(problem, Float64Array.from(cols, (c) => theta[c]), { maxIterations: n, damping: settings.damping }, yieldToEvents, () => hooks.shouldStop?.() ?? false);
    theta = problem.embed(r.x);
    if (r.reason === 'interrupted') stopped = 'interrupted';
  };

  const lastMu = new Map<ResidualPart, number>();
  /** LM on one part: the whole system, or one propagator's columns in the current fields. */
  const solvePart = async (part: ResidualPart, iterations: number, plateau = 0) => {
    const problem = sys.partProblem(theta, part);
    const { first, embed } = problem;
    const PLATEAU_WINDOW = 5;
    const costs: number[] = [];
    const flat = (cost: number) => {
      costs.push(cost);
      if (plateau <= 0 || costs.length <= PLATEAU_WINDOW) return false;
      const before = costs[costs.length - 1 - PLATEAU_WINDOW];
      return before - cost < plateau * before;
    };
    const r = await levenbergMarquardtYielding(
      problem,
      theta.slice(first, first + problem.size),
      // Each part resumes from the damping its previous solve ended with: after a field step
      // the problem is a nearby one, and restarting from τ·max diag(JᵀJ) would spend the
      // first iterations of every cycle re-learning μ.
      { maxIterations: iterations, damping: settings.damping, initialMu: lastMu.get(part), extraSteps: part === 'all' ? 0 : (settings.extraSteps ?? 0), onIteration: (it, xs) => record(it.mu, embed(xs)) && !flat(it.cost) },
      yieldToEvents,
      () => hooks.shouldStop?.() ?? false,
    );
    if (Number.isFinite(r.mu)) lastMu.set(part, r.mu);
    theta = embed(r.x);
    lastReason = r.reason;
    if (r.reason === 'interrupted') stopped = 'interrupted';
  };

  // The field step of the alternating strategy, all in float64: the SCFT update of the networks'
  // own φ, the lamella's phase pinned where it started (physics/translation.ts: the translation
  // mode is a zero mode of the iteration), and the field network fitted to it by LM.
  const twoSpecies = nets.chain.species.length === 2;
  // A film has no translation mode (its walls fix the layers): nothing to pin there.
  const pinPhase = nets.field && twoSpecies && nets.cell.translation ? lamellarPhase(sys.state(theta).w, settings.periods).phase : null;
  const gridCell = nets.cell.withPoints(sys.nx);
  const stateSys = settings.stateNodesPerBlock && settings.stateNodesPerBlock !== settings.nodesPerBlock ? new ScftResidualSystem(nets, system, { nx: settings.nx, nodesPerBlock: settings.stateNodesPerBlock, spread: settings.contourSpread }, weights) : sys;
  const mixer = new AndersonMixer(settings.fieldStep === 'anderson' ? settings.andersonHistory : 0, settings.fieldMixing);
  const onChain = nets.chain.species;
  let cycle = 0;
  const fieldSteps: FieldStepReport[] = [];
  const fieldStep = () => {
    const { phi, w } = stateSys.state(theta);
    const { deviation, residual } = fieldDeviation(nets.chain, system.chiN, w, phi, gridCell);
    // x = (w_K) and d = (d_K) over the species on the chain, concatenated on the grid.
    const nx = sys.nx;
    const flat = (u: SpeciesArrays) => {
      const out = new Float64Array(onChain.length * nx);
      onChain.forEach((k, i) => out.set(u[k], i * nx));
      return out;
    };
    const current = flat(w);
    const next = mixer.next(current, flat(deviation));
    const scale = (settings.fieldStepDecay ?? 1) ** cycle;
    if (scale !== 1) for (let j = 0; j < next.length; j++) next[j] = current[j] + scale * (next[j] - current[j]);
    const target: SpeciesArrays = { A: new Float64Array(nx), B: new Float64Array(nx) };
    onChain.forEach((k, i) => target[k].set(next.subarray(i * nx, (i + 1) * nx)));
    fixGauge(nets.chain, target, gridCell);
    if (pinPhase !== null) pinLamellarPhase(target, new PeriodicCell(nets.length, nx, settings.periods), pinPhase);
    const fit = sys.fieldFit(theta, target);
    const r = levenbergMarquardt(fit, theta.slice(fit.first, fit.first + fit.size), { maxIterations: FIELD_FIT_ITERATIONS, damping: settings.damping });
    theta = Float64Array.from(theta);
    theta.set(r.x, fit.first);
    // fieldFit's cost is ½ Σ_c,j (w − target)² / (species · nx): its RMS is √(2 cost).
    let move = 0;
    onChain.forEach((k, i) => target[k].forEach((v, j) => (move = Math.max(move, Math.abs(v - current[i * nx + j])))));
    const report = { cycle: ++cycle, afterIteration: done, residual, fitRms: Math.sqrt(2 * r.cost), move };
    fieldSteps.push(report);
    hooks.onFieldStep?.(report);
  };

  if (!stopped) {
    if (settings.strategy === 'joint') await solvePart('all', settings.iterations);
    else {
      const sides: ResidualPart[] = nets.shared ? ['q'] : ['q', 'qDagger'];
      // A first cycle of its own length: from a warm start the fields are already near the
      // solution, and a field step taken from propagators that are not yet converged in them
      // moves the fields by the propagators' error (measured at f = 0.35, χN = 22: max |d|
      // stayed near 1 kT and φ_A drifted away, docs/second-order-training.md).
      const first = settings.firstCycleIterations > 0 ? Math.min(settings.firstCycleIterations, Math.floor(settings.iterations / sides.length)) : 0;
      const restCycles = first > 0 ? Math.max(1, settings.cycles - 1) : settings.cycles;
      // The later cycles share what the first left (all of it when the first has no length of its own).
      let perCycle = Math.max(1, Math.ceil(settings.iterations / (restCycles * sides.length)));
      for (let c = 0; c < settings.cycles && !stopped && done < settings.iterations; c++) {
        if (c > 0 && nets.field) fieldStep();
        if (c === 1 && first > 0) perCycle = Math.max(1, Math.ceil((settings.iterations - done) / (restCycles * sides.length)));
        for (const side of sides) {
          if (stopped || done >= settings.iterations) break;
          if (side !== 'all') await solveOutputLayer(side);
          if (stopped) break;
          await solvePart(side, Math.min(c === 0 && first > 0 ? first : perCycle, settings.iterations - done), c === 0 && first > 0 ? (settings.firstCyclePlateau ?? 0) : 0);
        }
      }
      if (!stopped && settings.jointIterations > 0) {
        if (nets.field) fieldStep();
        await solvePart('all', settings.jointIterations);
      }
    }
  }
  // The kept state: the lowest reference error measured, or with no evaluation the last iterate.
  if (!evaluated) best = { iteration: done, loss: lastLoss, phiError: undefined, x: theta };
  nets.parameters.unflatten(best.x);
  return {
    iterations: done,
    loss: lastLoss,
    reason: stopped ?? lastReason,
    seconds: seconds(),
    best: { iteration: best.iteration, loss: best.loss, ...(best.phiError !== undefined ? { phiError: best.phiError } : {}) },
    fieldSteps,
    ...(reachedTarget ? { reachedTarget } : {}),
  };
}

/**
 * The second-order phase of a train run: Levenberg–Marquardt (numerics/levenberg-marquardt.ts,
 * Nielsen's damping update) on the whole SCFT residual system in float64
 * (network/least-squares/scft-residual-system.ts): the MDE of every propagator, the
 * incompressibility, self-consistency and gauge equations, with the field network trained
 * jointly with the propagators. The normal matrix is assembled from the row groups of the
 * Jacobian (numerics/grouped-normal-equations.ts) and factorised by Cholesky.
 *
 * The networks' tfjs variables (float32) are written only when the state is evaluated or
 * kept; the iteration itself runs on its float64 copy of the parameters.
 * Loss = Σ r² = the weighted total of losses/terms.ts on the phase's grid (the junction nodes
 * count once per block they bound).
 */
import type { SystemSpec } from '../physics/chain-schema.js';
import type { ScftNetworks } from '../network/scft-networks.js';
import type { LossValues } from '../network/losses/terms.js';
import { ScftResidualSystem } from '../network/least-squares/scft-residual-system.js';
import { groupedNormalEquations } from '../numerics/grouped-normal-equations.js';
import { levenbergMarquardt } from '../numerics/levenberg-marquardt.js';
import type { LmStop } from '../numerics/levenberg-marquardt.js';

export interface SecondOrderSettings {
  iterations: number;
  nx: number;
  nodesPerBlock: number;
  damping: 'marquardt' | 'identity';
  /** Evaluate against the reference every this many iterations (0: at the end only). */
  evaluateEvery: number;
  /** Stop once the reference error is below this. */
  targetPhiError?: number;
  /** Stop once the loss is below this. */
  lossTolerance: number;
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

export interface SecondOrderHooks {
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
  /** First iteration (and seconds) at which the reference error fell below the target. */
  reachedTarget?: { iteration: number; seconds: number };
}

export function runSecondOrder(nets: ScftNetworks, system: SystemSpec, weights: LossValues, settings: SecondOrderSettings, hooks: SecondOrderHooks = {}): SecondOrderResult {
  const t0 = performance.now();
  const seconds = () => (performance.now() - t0) / 1000;
  const sys = new ScftResidualSystem(nets, system, { nx: settings.nx, nodesPerBlock: settings.nodesPerBlock }, weights);
  const x0 = nets.parameters.flatten();
  const start = sys.evaluate(x0, false);
  const evaluated = Boolean(hooks.evaluate);
  let best = { iteration: 0, loss: 2 * start.cost, phiError: evaluated ? hooks.evaluate!() : undefined, x: x0 };
  let stopped: SecondOrderResult['reason'] | null = null;
  let reachedTarget: SecondOrderResult['reachedTarget'];
  const target = settings.targetPhiError;
  if (best.phiError !== undefined && target !== undefined && best.phiError < target) reachedTarget = { iteration: 0, seconds: 0 };
  const result = reachedTarget
    ? { x: x0, cost: start.cost, iterations: 0, reason: 'callback' as LmStop, mu: Number.NaN }
    : levenbergMarquardt(
        {
          size: sys.size,
          cost: (x) => sys.cost(x),
          linearise: (x) => {
            const e = sys.evaluate(x, true);
            const { A, g } = groupedNormalEquations(sys.size, e.groups!);
            return { kind: 'normal', cost: e.cost, A, g };
          },
        },
        x0,
        {
          maxIterations: settings.iterations,
          damping: settings.damping,
          costTolerance: settings.lossTolerance / 2,
          onIteration: (it, x) => {
            const last = it.iteration === settings.iterations;
            let phiError: number | undefined;
            if (evaluated && (last || (settings.evaluateEvery > 0 && it.iteration % settings.evaluateEvery === 0))) {
              nets.parameters.unflatten(x);
              phiError = hooks.evaluate!();
            }
            const loss = 2 * it.cost;
            const better = evaluated ? phiError !== undefined && !(phiError >= (best.phiError ?? Infinity)) : loss < best.loss;
            if (better) best = { iteration: it.iteration, loss, phiError, x: Float64Array.from(x) };
            const terms = sys.evaluate(x, false).terms;
            const t = seconds();
            hooks.onRecord?.({ iteration: it.iteration, loss, terms, mu: it.mu, seconds: t, ...(phiError !== undefined ? { phiError } : {}) });
            const rate = it.iteration / Math.max(1e-9, t);
            hooks.onProgress?.({ iteration: it.iteration, iterations: settings.iterations, loss, mu: it.mu, rate, secondsLeft: (settings.iterations - it.iteration) / rate, ...(phiError !== undefined ? { phiError } : {}) });
            if (phiError !== undefined && target !== undefined && phiError < target && !reachedTarget) {
              reachedTarget = { iteration: it.iteration, seconds: t };
              stopped = 'target-reached';
              return false;
            }
            if (hooks.shouldStop?.()) {
              stopped = 'interrupted';
              return false;
            }
            return true;
          },
        },
      );
  // The kept state: with no evaluation, the lowest loss seen (the last accepted iterate is that one).
  const keep = evaluated ? best.x : result.x;
  if (!evaluated) best = { iteration: result.iterations, loss: 2 * result.cost, phiError: undefined, x: result.x };
  nets.parameters.unflatten(keep);
  return {
    iterations: result.iterations,
    loss: 2 * result.cost,
    reason: stopped ?? (reachedTarget ? 'target-reached' : result.reason),
    seconds: seconds(),
    best: { iteration: best.iteration, loss: best.loss, ...(best.phiError !== undefined ? { phiError: best.phiError } : {}) },
    ...(reachedTarget ? { reachedTarget } : {}),
  };
}

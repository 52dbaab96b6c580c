/**
 * The verdict on a trained network against its spectral reference (issue 16): a run is
 * trusted only when
 *   - its φ_A relative L2 error is at or below the config's training.targetPhiError (when
 *     the config gives one), and
 *   - where the reference is ordered (lamellar), the network's φ_A is ordered too: its
 *     amplitude max φ_A − min φ_A is at least half the reference's (a network that smears
 *     the lamella out is not a lamella, whatever the disorder threshold says).
 * Otherwise the run carries warnings, its phase is reported as 'unconfirmed' (never a phase
 * named on the network's behalf), and `train` exits 3 when a target was asked for.
 */
import type { ScftSolution } from '../physics/result.js';
import type { SolutionMetrics } from '../physics/solution-metrics.js';

/** Share of the reference's φ_A amplitude below which a network is not ordered (common practice, no source). */
export const ORDERED_AMPLITUDE_SHARE = 0.5;

export interface RunVerdict {
  ok: boolean;
  /** null when the config gives no target. */
  aboveTarget: boolean | null;
  /** null when the reference is not ordered (nothing to compare). */
  ordered: boolean | null;
  warnings: string[];
  /** 'ok', or the warnings joined: one line for tables that show strings only (the report's metrics page). */
  summary: string;
}

export function runVerdict(network: ScftSolution, reference: ScftSolution, errors: SolutionMetrics, targetPhiError: number | undefined): RunVerdict {
  const warnings: string[] = [];
  const err = errors.phiA.relativeL2;
  const aboveTarget = targetPhiError === undefined ? null : !(err <= targetPhiError);
  if (aboveTarget) warnings.push(`φA relative L2 error ${err.toExponential(2)} is above the target training.targetPhiError = ${targetPhiError}`);
  let ordered: boolean | null = null;
  if (reference.phase === 'lamellar') {
    ordered = network.amplitude >= ORDERED_AMPLITUDE_SHARE * reference.amplitude;
    if (!ordered) {
      warnings.push(`the network's φA amplitude ${network.amplitude.toExponential(2)} is below ${ORDERED_AMPLITUDE_SHARE} of the reference's ${reference.amplitude.toExponential(2)}: its density is not ordered where the reference is`);
    }
  }
  return { ok: warnings.length === 0, aboveTarget, ordered, warnings, summary: warnings.length === 0 ? 'ok' : `WARNING: ${warnings.join('; ')}` };
}

/**
 * The human summary of a solution (solve's stdout): only numbers that mean something for
 * this result, each with its unit and a sensible number of digits (io/number-format.ts).
 * A disordered result has no period and no ΔF; lamellae are named as compared with the
 * disordered melt only (physics/lamellar-window.ts).
 */
import type { Phase } from '../physics/result.js';
import { phaseLabel } from '../physics/lamellar-window.js';
import type { SolutionSummary } from './formats/solution.js';
import { formatNumber } from './number-format.js';

export function solutionSummaryLines(s: SolutionSummary): string[] {
  const lines = [`chain ${s.chain}, χN = ${formatNumber(s.chiN)}, phase: ${phaseLabel(s.phase as Phase)}${s.converged ? '' : ' (NOT CONVERGED)'}`];
  if (s.period !== null) {
    const search = s.periodTolerance !== undefined ? ` (stress-free, found to a relative ${formatNumber(s.periodTolerance, 2)})` : '';
    const cell = s.periods > 1 ? `; the cell holds ${s.periods} periods, ${formatNumber(s.length, 7)} Rg` : '';
    lines.push(`period ${formatNumber(s.period, 7)} Rg${search}${cell}`);
  } else if (s.periods === 0) {
    lines.push(`film of thickness ${formatNumber(s.length, 7)} Rg`);
  }
  const energy = [`F = ${formatNumber(s.freeEnergy, 10)} kT/chain`];
  if (s.freeEnergyDisordered !== null && s.phase !== 'disordered') energy.push(`F_disordered = ${formatNumber(s.freeEnergyDisordered, 10)} kT/chain`);
  if (s.freeEnergyExcess !== null) energy.push(`F − F_disordered = ${formatNumber(s.freeEnergyExcess, 6)} kT/chain`);
  lines.push(energy.join(', '));
  lines.push(`Q = ${formatNumber(s.Q, 12)} (from q†: ${formatNumber(s.QDagger, 12)}), ${s.iterations} iterations, field residual ${formatNumber(s.residual, 3)} kT`);
  const perBlock = s.contourSteps && s.contourSteps.length > 1 ? ` (${s.contourSteps.join(' + ')} per block)` : '';
  lines.push(`resolution: ${s.nx} grid points, ${s.ns} contour steps${perBlock}`);
  lines.push(...s.notes.map((n) => `note: ${n}`));
  return lines;
}

/**
 * Timing of the spectral reference (not a test: prints figures, never fails on a time).
 * Each figure is the median of several runs after a warm-up, on whatever else the
 * machine is doing at the time.
 */
import { buildChain } from '../physics/chain.js';
import { PeriodicCell } from '../physics/cell/periodic-cell.js';
import { contourWithTotal } from '../physics/contour.js';
import { PropagatorSolver } from '../spectral/propagator-solver.js';
import { cosineStart, solveFixedCell } from '../spectral/scft-solver.js';
import { findEquilibriumPeriod } from '../spectral/period-search.js';
import type { SystemSpec } from '../physics/chain-schema.js';
import { timeIt } from './timing.js';

export function runSpectralBench(): void {
  const system: SystemSpec = { chain: { type: 'diblock', f: 0.5, segmentRatio: 1 }, chiN: 20 };
  const chain = buildChain(system.chain);
  console.log('spectral reference, f = 0.5, χN = 20 (cosine start, tolerance 1e-9, L = 4.045 Rg)');
  console.log('  nx    ns   solve ms  iterations  propagation ms  period search ms (evaluations)');
  for (const [nx, ns] of [
    [32, 100],
    [64, 100],
    [128, 100],
    [64, 200],
    [128, 200],
    [256, 400],
  ]) {
    let iterations = 0;
    const cell = new PeriodicCell(4.045, nx, 1);
    const solveMs = timeIt(() => {
      iterations = solveFixedCell({ system, cell, contour: ns }).iterations;
    }, 5);
    const solver = new PropagatorSolver(chain, cell, contourWithTotal(chain, ns));
    solver.setFields(cosineStart(chain, 20, cell, 0.3));
    // One solve() runs both propagators (q and q†).
    const propMs = timeIt(() => solver.solve(), 20) / 2;
    let evaluations = 0;
    const periodMs = timeIt(() => {
      evaluations = findEquilibriumPeriod({ system, cell, contour: ns }).evaluations;
    }, 3);
    console.log(
      `  ${String(nx).padStart(4)} ${String(ns).padStart(5)} ${solveMs.toFixed(1).padStart(10)} ${String(iterations).padStart(11)} ${propMs.toFixed(3).padStart(15)} ${periodMs.toFixed(0).padStart(17)} (${evaluations})`,
    );
  }
}

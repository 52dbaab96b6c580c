import { describe, expect, it } from 'vitest';
import { bracketMinimum, brentMinimize } from '../../src/numerics/brent-minimize.js';
import { PeriodicCell } from '../../src/physics/cell/periodic-cell.js';
import { LamellaModel } from '../../src/inverse/lamella-model.js';
import { findEquilibriumPeriod } from '../../src/spectral/period-search.js';
import { countDomains, solveFixedCell } from '../../src/spectral/scft-solver.js';
import { solveFromConfig } from '../../src/spectral/solve-from-config.js';
import { solveConfigSchema } from '../../src/io/schemas/solve-config.js';

const system = (chiN: number) => ({ chain: { type: 'diblock' as const, f: 0.5, segmentRatio: 1 }, chiN });

describe('the equilibrium period', () => {
  it('the stress-free period is the minimum of F(L), found independently by Brent’s method on full solves', () => {
    // Independent method: minimise the converged free energy over the cell length (Brent,
    // Algorithms for Minimization without Derivatives, 1973), each point a full SCFT solve.
    // The two differ by the contour discretisation error only (docs/physics.md: 6.6e-6 Rg at
    // 100 steps, 9e-8 Rg at 800), so at 400 steps they agree to a few 1e-7 Rg. 32 points suffice
    // at χN = 20 (measured: the two agree to 6.9e-8 Rg on 32 points, 2.6e-8 on 64, and both
    // periods move by 3e-8 Rg between the grids) at 0.4 of the CPU time of 64.
    const cell = new PeriodicCell(1, 32, 1);
    const ns = 400;
    let warm: Float64Array[] | undefined;
    const F = (L: number) => {
      const s = solveFixedCell({ system: system(20), cell: cell.withLength(L), contour: ns, initial: warm ? { A: warm[0], B: warm[1] } : undefined, options: { tolerance: 1e-11 } });
      warm = [s.w.A, s.w.B];
      return s.freeEnergy;
    };
    const br = bracketMinimum(F, 3.9, 4.1, 3, 5);
    const direct = brentMinimize(F, br, 1e-8).x;
    const stress = findEquilibriumPeriod({ system: system(20), cell, contour: ns, options: { tolerance: 1e-11, periodTolerance: 1e-9 } }).period;
    expect(Math.abs(stress - direct)).toBeLessThan(1e-6);
    // The inverse tools' forward model uses the same search (spectral/stress-free-search.ts) at its
    // own tolerance (1e-6 relative, ~4e-6 Rg here).
    const model = new LamellaModel({ chain: system(20).chain, nx: 32, ns, options: { tolerance: 1e-11 } });
    expect(Math.abs(model.equilibrium(20).period - stress)).toBeLessThan(5e-6);
  });

  it('a fixed cell that holds two equilibrium periods gives the lamella with two periods, not disorder', () => {
    // Issue 12 §6, measured before the fix: χN = 15, L = 7.4 Rg gave the disordered state
    // (F = 3.75) while --period 3.7 --periods 2 in the same cell gave the lamella, F = 3.4293.
    const config = (period: number, periods: number) => solveConfigSchema.parse({ version: 2, kind: 'solve', system: system(15), cell: { period, periods, nx: 128, ns: 100 } });
    const one = solveFromConfig(config(7.4, 1)).solution;
    const two = solveFromConfig(config(3.7, 2)).solution;
    expect(one.phase).toBe('lamellar');
    expect(countDomains(one.phi.A)).toBe(2);
    expect(Math.abs(one.freeEnergy - two.freeEnergy)).toBeLessThan(1e-9);
    expect(one.notes[0]).toMatch(/holds 2 periods/);
  });
});

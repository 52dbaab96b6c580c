import { describe, expect, it } from 'vitest';
import { buildChain } from '../../src/physics/chain.js';
import { systemSchema } from '../../src/physics/chain-schema.js';
import { fieldFormFreeEnergy, freeEnergy } from '../../src/physics/scft-equations.js';
import { solveFixedCell, solveInFields } from '../../src/spectral/scft-solver.js';
import { PeriodicCell } from '../../src/physics/cell/periodic-cell.js';
import { compareSolutions } from '../../src/physics/solution-metrics.js';

// The field form of the SCFT free energy, F[w] = −ln Q[w] + ⟨(w_A − w_B)²/(4χN) − (w_A + w_B)/2⟩
// + χN/4, is the mean-field Hamiltonian of the incompressible A/B melt after the pressure is
// eliminated (the usual form of Fredrickson's and Matsen's reviews of SCFT, from memory): it
// equals the density form at a solution and is stationary in w there. Checked against the
// spectral reference solver's own solutions (pseudo-spectral MDE, an independent computation).
describe('field form of the free energy', () => {
  const system = systemSchema.parse({ chain: { type: 'diblock', f: 0.5 }, chiN: 15 });
  const chain = buildChain(system.chain);
  const L = 3.7137;
  const cell = new PeriodicCell(L, 64, 1);
  const sol = solveFixedCell({ system, cell, contour: 100 });

  it('equals the density form at a converged solution', () => {
    expect(sol.converged).toBe(true);
    const field = fieldFormFreeEnergy(chain, cell, 15, sol.Q, sol.w)!;
    expect(Math.abs(field - sol.freeEnergy)).toBeLessThan(1e-8);
    expect(Math.abs(freeEnergy(cell, 15, sol.Q, sol.w, sol.phi) - sol.freeEnergy)).toBeLessThan(1e-12);
  });

  it('is stationary in w at the solution (error ∝ ε²), the density form is not (∝ ε)', () => {
    const k = (2 * Math.PI) / L;
    const at = (eps: number) => {
      const w = {
        A: Float64Array.from(sol.w.A, (v, j) => v + eps * (Math.cos(2 * k * cell.x[j]) + 0.4)),
        B: Float64Array.from(sol.w.B, (v, j) => v + eps * (0.5 * Math.sin(k * cell.x[j]) - 0.2)),
      };
      const s = solveInFields({ system, cell, contour: 100, fields: w });
      return {
        field: Math.abs(fieldFormFreeEnergy(chain, cell, 15, s.Q, w)! - sol.freeEnergy),
        density: Math.abs(freeEnergy(cell, 15, s.Q, w, s.phi) - sol.freeEnergy),
      };
    };
    const a = at(2e-3);
    const b = at(1e-3);
    expect(a.field / b.field).toBeGreaterThan(3.5);
    expect(a.field / b.field).toBeLessThan(4.5);
    expect(a.density / b.density).toBeGreaterThan(1.8);
    expect(a.density / b.density).toBeLessThan(2.2);
    expect(a.field).toBeLessThan(0.05 * a.density);
  });

  it('a one-species melt: −ln Q − ⟨w⟩; two species at χN = 0: no field form', () => {
    const homo = buildChain({ type: 'homopolymer', species: 'A' });
    const w = { A: Float64Array.from(cell.x, (t) => 0.3 + Math.cos(t)), B: new Float64Array(64) };
    expect(fieldFormFreeEnergy(homo, cell, 0, 2, w)).toBeCloseTo(-Math.log(2) - cell.mean(w.A), 14);
    expect(fieldFormFreeEnergy(chain, cell, 0, 2, w)).toBeNull();
  });

  it('both are unchanged by a constant shift of the fields (the gauge), and so is the Q error', () => {
    // w → w + c multiplies Q by e^{−c} (the Boltzmann weight of every path; common practice, no source).
    const c = 0.37;
    const w = { A: sol.w.A.map((v) => v + c), B: sol.w.B.map((v) => v + c) };
    const shifted = { ...sol, w, Q: sol.Q * Math.exp(-c) };
    expect(fieldFormFreeEnergy(chain, cell, 15, shifted.Q, w)!).toBeCloseTo(sol.freeEnergy, 8);
    expect(compareSolutions(shifted, sol).QRelativeError).toBeLessThan(1e-12);
    expect(compareSolutions({ ...sol, Q: sol.Q * 1.001 }, sol).QRelativeError).toBeCloseTo(1e-3, 9);
  });
});

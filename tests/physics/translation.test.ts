import { describe, expect, it } from 'vitest';
import { buildChain } from '../../src/physics/chain.js';
import { systemSchema } from '../../src/physics/chain-schema.js';
import { fieldDeviation } from '../../src/physics/scft-equations.js';
import { lamellarPhase, modePhase, pinLamellarPhase } from '../../src/physics/translation.js';
import { solveFixedCell } from '../../src/spectral/scft-solver.js';
import { PeriodicCell } from '../../src/physics/cell/periodic-cell.js';
import { contourWithTotal } from '../../src/physics/contour.js';
import { PropagatorSolver } from '../../src/spectral/propagator-solver.js';

const grid = (n: number, L: number) => Float64Array.from({ length: n }, (_, j) => (j * L) / n);

describe('translation mode of a lamella', () => {
  it('modePhase reads amplitude and phase of a pure harmonic exactly', () => {
    // u = a cos(k_p x − θ): discrete Fourier orthogonality on the periodic grid (common practice, no source).
    const L = 3.7;
    const x = grid(64, L);
    for (const p of [1, 2]) {
      const u = Float64Array.from(x, (t) => 0.7 + 1.3 * Math.cos((2 * Math.PI * p * t) / L - 0.4) + 0.2 * Math.cos((2 * Math.PI * 3 * p * t) / L));
      const m = modePhase(u, p);
      expect(m.amplitude).toBeCloseTo(1.3, 12);
      expect(m.phase).toBeCloseTo(0.4, 12);
    }
  });

  it('pinning undoes an arbitrary shift of a converged lamella to round-off, and the shifted lamella is still a solution', () => {
    // Translation invariance of the SCFT equations (common practice, no source): a shifted
    // solution solves them too, and the pin brings it back onto the original one.
    const system = systemSchema.parse({ chain: { type: 'diblock', f: 0.5 }, chiN: 15 });
    const chain = buildChain(system.chain);
    const L = 3.7137;
    const cell = new PeriodicCell(L, 64, 1);
    const sol = solveFixedCell({ system, cell, contour: 100 });
    const phase0 = lamellarPhase(sol.w, 1).phase;
    // Shift by 0.123 Rg through the trigonometric interpolant (a band-limited field shifts exactly).
    const w = { A: Float64Array.from(sol.w.A), B: Float64Array.from(sol.w.B) };
    pinLamellarPhase(w, cell, phase0 + (2 * Math.PI * 0.123) / L);
    let moved = 0;
    for (let j = 0; j < 64; j++) moved = Math.max(moved, Math.abs(w.A[j] - sol.w.A[j]));
    expect(moved).toBeGreaterThan(0.1);
    // The shifted fields are still self-consistent: their densities (one propagator solve in
    // them; a solver's record would move them back into the phase convention) answer them.
    const solver = new PropagatorSolver(chain, cell, contourWithTotal(chain, 100));
    solver.setFields(w);
    const again = solver.solve();
    expect(fieldDeviation(chain, 15, w, again.phi).residual).toBeLessThan(1e-6);
    const delta = pinLamellarPhase(w, cell, phase0);
    expect(Math.abs(delta)).toBeCloseTo(0.123, 9);
    for (let j = 0; j < 64; j++) {
      expect(w.A[j]).toBeCloseTo(sol.w.A[j], 8);
      expect(w.B[j]).toBeCloseTo(sol.w.B[j], 8);
    }
  });

  it('leaves a field with no lamellar harmonic (disordered) alone', () => {
    const w = { A: new Float64Array(32).fill(1.5), B: new Float64Array(32).fill(-1.5) };
    expect(pinLamellarPhase(w, new PeriodicCell(3, 32, 1), 0.3)).toBe(0);
    expect(Array.from(w.A).every((v) => v === 1.5)).toBe(true);
  });
});

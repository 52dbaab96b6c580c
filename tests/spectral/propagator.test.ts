import { describe, expect, it } from 'vitest';
import { buildChain } from '../../src/physics/chain.js';
import { PeriodicCell } from '../../src/physics/cell/periodic-cell.js';
import { contourWithTotal } from '../../src/physics/contour.js';
import type { SpeciesArrays } from '../../src/physics/fields.js';
import { PropagatorSolver } from '../../src/spectral/propagator-solver.js';
import { crankNicolsonQ1 } from '../helpers/crank-nicolson.js';

const homopolymer = buildChain({ type: 'homopolymer', species: 'A', segmentLength: 1 });

function solveIn(wA: Float64Array, length: number, ns: number, richardson = true, chain = homopolymer) {
  const nx = wA.length;
  const solver = new PropagatorSolver(chain, new PeriodicCell(length, nx), contourWithTotal(chain, ns), { richardson });
  const w: SpeciesArrays = { A: wA, B: new Float64Array(nx) };
  solver.setFields(w);
  return solver.solve();
}

function cosField(nx: number, eps: number, mode = 1, offset = 0): Float64Array {
  return Float64Array.from({ length: nx }, (_, j) => offset + eps * Math.cos((2 * Math.PI * mode * j) / nx));
}

describe('pseudo-spectral MDE', () => {
  it('uniform field: q(x, s) = exp(−w s) and Q = exp(−w) exactly', () => {
    // Analytic solution of ∂q/∂s = ∇²q − w q with uniform w: q = e^{−w s} (exact; common practice, no source).
    const w = 1.7;
    const r = solveIn(new Float64Array(32).fill(w), 3, 40);
    expect(r.Q).toBeCloseTo(Math.exp(-w), 14);
    for (const i of [0, 7, 20, 40]) for (const j of [0, 13]) expect(r.q[i][j]).toBeCloseTo(Math.exp(-w * (i / 40)), 14);
    for (const j of [0, 5, 31]) expect(r.phi.A[j]).toBeCloseTo(1, 12);
  });

  it('weak cosine field: linear response of q(x,1), ln Q and φ (Debye function)', () => {
    // Standard linear-response results (the Debye function: Leibler 1980; the rest common practice, no source). With X = (k Rg)², g_D = 2(e^{−X} + X − 1)/X²:
    //   q(x,1) ≈ 1 − ε cos(kx)(1 − e^{−X})/X,  ln Q ≈ (ε²/4) g_D(X),  φ ≈ 1 − ε g_D(X) cos(kx).
    // Derivation: first order in ε, each Fourier mode of w decays as e^{−X s}; integrate over s.
    // Odd/even parts in ε (runs at ±ε) isolate each order, so the residual is O(ε³) (O(ε⁴) for ln Q).
    const nx = 64;
    const L = 4.1;
    const eps = 1e-3;
    const k = (2 * Math.PI) / L;
    const X = k * k;
    const gD = (2 * (Math.exp(-X) + X - 1)) / (X * X);
    const plus = solveIn(cosField(nx, eps), L, 200);
    const minus = solveIn(cosField(nx, -eps), L, 200);
    let worstQ = 0;
    let worstPhi = 0;
    for (let j = 0; j < nx; j++) {
      const c = Math.cos(k * ((j * L) / nx));
      const oddQ = (plus.q[200][j] - minus.q[200][j]) / 2;
      worstQ = Math.max(worstQ, Math.abs(oddQ - -eps * c * ((1 - Math.exp(-X)) / X)));
      const oddPhi = (plus.phi.A[j] - minus.phi.A[j]) / 2;
      worstPhi = Math.max(worstPhi, Math.abs(oddPhi - -eps * gD * c));
    }
    expect(worstQ).toBeLessThan(1e-9);
    expect(worstPhi).toBeLessThan(1e-9);
    const evenLnQ = (Math.log(plus.Q) + Math.log(minus.Q)) / 2;
    expect(Math.abs(evenLnQ / ((eps * eps) / 4) / gD - 1)).toBeLessThan(1e-5);
  });

  it('fourth order in ds with Richardson extrapolation, second order without', () => {
    // Ranjan, Qin & Morse, Macromolecules 41, 942 (2008): the split step is O(ds²), Richardson makes it O(ds⁴).
    const w = cosField(64, 3, 1, 0.5);
    const L = 3.5;
    const exact = solveIn(w, L, 2560).Q;
    const err = (ns: number, r: boolean) => Math.abs(solveIn(w, L, ns, r).Q - exact);
    // Coarse enough that the error sits far above round-off, fine enough to be asymptotic.
    const rich = [32, 64, 128].map((n) => err(n, true));
    const plain = [32, 64, 128].map((n) => err(n, false));
    for (let i = 0; i < 2; i++) {
      const rr = rich[i] / rich[i + 1];
      const rp = plain[i] / plain[i + 1];
      expect(rr).toBeGreaterThan(14);
      expect(rr).toBeLessThan(17);
      expect(rp).toBeGreaterThan(3.8);
      expect(rp).toBeLessThan(4.2);
    }
  });

  it('agrees with an independent Crank–Nicolson finite-difference solve on a fine grid', () => {
    // Independent method (tests/helpers/crank-nicolson.ts), second order in dx and ds.
    const L = 3.2;
    const spectral = solveIn(cosField(64, 2.5, 1, 0.3), L, 200);
    const nxFine = 1024;
    const cn = crankNicolsonQ1(cosField(nxFine, 2.5, 1, 0.3), L, 2000);
    let worst = 0;
    for (let j = 0; j < 64; j++) worst = Math.max(worst, Math.abs(cn[j * (nxFine / 64)] - spectral.q[200][j]));
    expect(worst).toBeLessThan(2e-5);
    expect(worst).toBeGreaterThan(0); // not the same code path
  });

  it('Q from q equals Q from q† for an asymmetric chain in arbitrary fields', () => {
    // Common practice, no source: both propagators integrate the same chain partition function.
    const chain = buildChain({ type: 'blocks', blocks: [{ species: 'A', fraction: 0.3, segmentLength: 1.4 }, { species: 'B', fraction: 0.5, segmentLength: 1 }, { species: 'A', fraction: 0.2, segmentLength: 1.4 }] });
    const nx = 32;
    const solver = new PropagatorSolver(chain, new PeriodicCell(3.7, nx), contourWithTotal(chain, 100));
    solver.setFields({ A: cosField(nx, 3, 1, 1), B: cosField(nx, -2, 2, -0.5) });
    const r = solver.solve();
    expect(chain.palindromic).toBe(false);
    expect(Math.abs(r.Q / r.QDagger - 1)).toBeLessThan(1e-12);
    // φ_A + φ_B averages to 1 for any fields (each chain segment is somewhere).
    let mean = 0;
    for (let j = 0; j < nx; j++) mean += r.phi.A[j] + r.phi.B[j];
    expect(mean / nx).toBeCloseTo(1, 8);
  });
});

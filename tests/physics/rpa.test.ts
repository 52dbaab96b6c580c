import { describe, expect, it } from 'vitest';
import { buildChain } from '../../src/physics/chain.js';
import { correlations, debyeBlock, inverseStructureFactor, spinodal } from '../../src/physics/rpa.js';

// Segment lengths of both blocks given separately: the general block form of a diblock.
const diblock = (f: number, bA = 1, bB = 1) =>
  buildChain({ type: 'blocks', blocks: [{ species: 'A', fraction: f, segmentLength: bA }, { species: 'B', fraction: 1 - f, segmentLength: bB }] });

describe('RPA spinodal (Leibler, Macromolecules 13, 1602, 1980)', () => {
  it('symmetric diblock: (χN)_s = 10.495 and q*Rg = 1.946', () => {
    // Leibler 1980: mean-field critical point of the symmetric diblock at χN = 10.495, x* = (q*Rg)² = 3.785.
    const sp = spinodal(diblock(0.5));
    expect(sp.chiN).toBeCloseTo(10.495, 3);
    expect(sp.qRg).toBeCloseTo(1.946, 3);
    expect(sp.qRg * sp.qRg).toBeCloseTo(3.785, 2);
    expect(sp.period).toBeCloseTo((2 * Math.PI) / 1.946, 2);
  });

  it('rises as f moves away from 0.5 and is symmetric under f → 1 − f', () => {
    // Leibler 1980, Fig. 2: the spinodal curve is symmetric about f = 1/2 with its minimum there.
    let prev = spinodal(diblock(0.5)).chiN;
    for (const f of [0.45, 0.4, 0.35, 0.3, 0.25, 0.2]) {
      const sp = spinodal(diblock(f));
      expect(sp.chiN).toBeGreaterThan(prev);
      expect(spinodal(diblock(1 - f)).chiN).toBeCloseTo(sp.chiN, 8);
      prev = sp.chiN;
    }
  });

  it('block-sum correlations equal the diblock Debye expressions of Leibler 1980', () => {
    // Handbook form (Leibler 1980 eqs. for the diblock): S_AA = g(f,x), S_BB = g(1−f,x), S_AB = [g(1,x) − g(f,x) − g(1−f,x)]/2.
    const g = (h: number, x: number) => (2 * (h * x + Math.exp(-h * x) - 1)) / (x * x);
    for (const f of [0.3, 0.5]) {
      for (const x of [0.5, 3.785, 12]) {
        const c = correlations(diblock(f), x);
        expect(c.AA).toBeCloseTo(g(f, x), 12);
        expect(c.BB).toBeCloseTo(g(1 - f, x), 12);
        expect(c.AB).toBeCloseTo((g(1, x) - g(f, x) - g(1 - f, x)) / 2, 12);
      }
    }
  });

  it('the Debye block function has its small-argument limit h²', () => {
    // Analytic: 2(z + e^{−z} − 1)/z² → 1 as z → 0.
    expect(debyeBlock(0.4, 1e-9)).toBeCloseTo(0.16, 10);
    expect(debyeBlock(0.4, 1e-2)).toBeCloseTo((2 * (0.004 + Math.exp(-0.004) - 1)) / 1e-4, 12);
  });

  it('N/S(q) is zero at the spinodal minimum and positive elsewhere at that χN', () => {
    const ch = diblock(0.5);
    const sp = spinodal(ch);
    const x = sp.qRg ** 2;
    expect(Math.abs(inverseStructureFactor(ch, sp.chiN, x))).toBeLessThan(1e-9);
    expect(inverseStructureFactor(ch, sp.chiN, 0.8 * x)).toBeGreaterThan(0);
    expect(inverseStructureFactor(ch, sp.chiN, 1.2 * x)).toBeGreaterThan(0);
  });

  it('symmetric ABA triblock: (χN)_s ≈ 18.0', () => {
    // From memory: the symmetric ABA triblock spinodal lies near χN = 18 (17.996 in mean field).
    const sp = spinodal(buildChain({ type: 'triblock', f: 0.5, firstBlockShare: 0.5, segmentRatio: 1 }));
    expect(sp.chiN).toBeCloseTo(18.0, 1);
  });

  it('conformational asymmetry changes the spinodal but keeps it symmetric under swapping A and B', () => {
    // Common practice, no source: relabelling the blocks cannot change the physics.
    const a = spinodal(diblock(0.4, 1.5, 1));
    const b = spinodal(diblock(0.6, 1, 1.5));
    expect(a.chiN).toBeCloseTo(b.chiN, 8);
    expect(a.qRg).toBeCloseTo(b.qRg, 6);
    expect(Math.abs(a.chiN - spinodal(diblock(0.4)).chiN)).toBeGreaterThan(0.01);
  });

  it('refuses a homopolymer', () => {
    expect(() => spinodal(buildChain({ type: 'homopolymer', species: 'A', segmentLength: 1 }))).toThrow(/both A and B/);
  });
});

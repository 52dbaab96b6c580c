/**
 * Extreme and awkward physics on small grids: a fixed cell holding several periods, strong
 * segregation (χN 200 and 500), a tolerance below round-off, the disordered melt. Each ends
 * in a right answer (checked against an identity or a handbook formula) or a clear failure.
 */
import { expect } from 'vitest';
import { runCli } from '../../src/cli/run-cli.js';
import type { FaultCase } from './harness.js';

const json = (s: string) => JSON.parse(s) as { phase: string; period: number; periods: number; freeEnergy: number; freeEnergyDisordered: number; converged: boolean };

/** A cell of k copies of the 3.7 Rg lamella on k times the points: the same lamella, the same F per chain (exact periodicity identity). */
function periodsInCell(k: number, nx: number): FaultCase {
  return {
    group: 'physics',
    name: `χN 15 in a fixed cell of ${k} × 3.7 Rg finds ${k} periods (same F as one period)`,
    argv: () => ['solve', '--chiN', '15', '--period', String(3.7 * k), '--nx', String(nx), '--ns', '40', '--json', '--quiet'],
    code: 0,
    check: async (r) => {
      const many = json(r.stdout);
      const one = json((await runCli(['solve', '--chiN', '15', '--period', '3.7', '--nx', String(nx / k), '--ns', '40', '--json', '--quiet'], { capture: true })).stdout);
      expect(many.phase).toMatch(/lamellar/);
      expect(one.phase).toMatch(/lamellar/);
      expect(many.periods).toBe(k);
      expect(Math.abs(many.freeEnergy - one.freeEnergy)).toBeLessThan(1e-7);
    },
  };
}

export const PHYSICS_CASES: FaultCase[] = [
  periodsInCell(2, 32),
  // 8 points per period: coarse, but the identity is exact at any resolution (measured: F agrees to 2e-11).
  periodsInCell(4, 32),
  {
    group: 'physics',
    name: 'χN 200 at a given period on a small grid: a strongly segregated lamella',
    argv: () => ['solve', '--chiN', '200', '--period', '6.5', '--nx', '32', '--ns', '200', '--json', '--quiet'],
    code: 0,
    check: (r) => {
      const s = json(r.stdout);
      expect(s.converged).toBe(true);
      expect(s.phase).toMatch(/lamellar/);
      // F_dis = χN f(1 − f) = 50 kT per chain for the melt (handbook formula, common practice); the lamella is far below it.
      expect(s.freeEnergyDisordered).toBeCloseTo(50, 10);
      expect(s.freeEnergy).toBeLessThan(0.5 * s.freeEnergyDisordered);
    },
  },
  {
    group: 'physics',
    name: 'χN 500 on a grid too coarse for it: a clear failure naming what to change',
    argv: () => ['solve', '--chiN', '500', '--period', '9', '--nx', '32', '--ns', '400', '--quiet'],
    code: 3,
    message: /solve did not converge: .*(andersonMixing|simpleSteps|nx|ns)/,
  },
  {
    group: 'physics',
    name: 'tolerance 1e-15 (below round-off): exit 3, not a stack trace',
    argv: () => ['solve', '--chiN', '15', '--period', '3.7', '--nx', '16', '--ns', '20', '--tolerance', '1e-15', '--quiet'],
    code: 3,
    message: /solve did not converge: not converged after \d+ iterations \(residual .* > tolerance 1e-15\)/,
  },
  {
    group: 'physics',
    name: 'χN 5 (below the order–disorder transition): the disordered melt, F = χN f(1 − f)',
    argv: () => ['solve', '--chiN', '5', '--period', '3.7', '--nx', '16', '--ns', '20', '--json', '--quiet'],
    code: 0,
    check: (r) => {
      const s = json(r.stdout);
      expect(s.phase).toBe('disordered');
      // Handbook formula for the homogeneous melt, kT per chain (common practice, no source).
      expect(s.freeEnergy).toBeCloseTo(5 * 0.25, 8);
    },
  },
  {
    group: 'physics',
    name: 'a homopolymer has no period to search',
    argv: () => ['solve', '--chain', 'homopolymer', '--period', 'equilibrium', '--quiet'],
    code: 2,
    message: /cell\.period: got "equilibrium"; a period search needs a chain with both A and B/,
  },
];

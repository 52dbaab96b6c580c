import { worstJacobianColumnError } from '../helpers/jacobian-check.js';
import { describe, expect, it } from 'vitest';
import { buildChain } from '../../src/physics/chain.js';
import { PeriodicCell } from '../../src/physics/cell/periodic-cell.js';
import { trainConfigSchema } from '../../src/io/schemas/train-config.js';
import { selectBackend } from '../../src/autodiff/backend.js';
import { buildScftNetworks } from '../../src/network/scft-networks.js';
import { ScftResidualSystem } from '../../src/network/least-squares/scft-residual-system.js';
import { NetworkInverseProblem } from '../../src/inverse/network-least-squares.js';
import { diblock } from './helpers.js';

// The gradient Jᵀr of the joint problem (SCFT rows, the χN column, the data rows) and the
// Jacobian of the propagator value fit, against central finite differences of the cost and
// the residuals (an independent method: common practice, no source). Tiny networks and grids.
async function smallSystem() {
  const chain = diblock(0.5);
  const { tf } = await selectBackend('wasm');
  const config = trainConfigSchema.parse({ version: 2, kind: 'train', system: { chain, chiN: 15 }, cell: { period: 4, nx: 16, ns: 20 }, networks: { field: { hidden: [6], seed: 1 }, propagator: { hidden: [5, 5], seed: 2 } }, collocation: { nx: 8, nodesPerBlock: 4, random: 0 } });
  const nets = buildScftNetworks(tf, config, buildChain(chain), 4, true);
  const sys = new ScftResidualSystem(nets, { chain, chiN: 15 }, { nx: 8, nodesPerBlock: 4 }, config.losses.weights);
  return { nets, sys };
}

/** The gradient Jᵀr of `linearise` against central differences of the cost, at the given columns. */
function expectGradientMatches(problem: NetworkInverseProblem, x: Float64Array, columns: number[], step: (a: number) => number): Float64Array {
  const lin = problem.linearise(x);
  expect(lin.cost).toBeCloseTo(problem.cost(x), 12);
  let scale = 0;
  for (const v of lin.g) scale = Math.max(scale, Math.abs(v));
  for (const a of columns) {
    const h = step(a);
    const xp = Float64Array.from(x);
    xp[a] += h;
    const xm = Float64Array.from(x);
    xm[a] -= h;
    const fd = (problem.cost(xp) - problem.cost(xm)) / (2 * h);
    expect(Math.abs(fd - lin.g[a])).toBeLessThan(1e-6 * scale + 1e-8);
  }
  return lin.g;
}

/** max |a_i − b_i| over max |a_i|. */
function worstRelative(a: Float64Array, b: Float64Array): number {
  let worst = 0;
  let scale = 0;
  for (let i = 0; i < a.length; i++) {
    worst = Math.max(worst, Math.abs(a[i] - b[i]));
    scale = Math.max(scale, Math.abs(a[i]));
  }
  return worst / scale;
}

describe('network inverse least-squares problem', () => {
  it('the gradient (χN column and data rows included) matches finite differences of the cost', async () => {
    const { nets, sys } = await smallSystem();
    const t = Float64Array.from({ length: 11 }, (_, i) => 0.13 + 0.35 * i);
    const phi = Float64Array.from(t, (x) => 0.5 + 0.3 * Math.cos((2 * Math.PI * x) / 4));
    const sigma = Float64Array.from(t, (_, i) => 0.02 + 0.002 * i);
    const grid = new PeriodicCell(4, 8, 1);
    const problem = new NetworkInverseProblem(sys, { matrix: grid.interpolationMatrix(t, 0.1), phi, sigma }, 14, 5);
    const x = problem.join(nets.parameters.flatten(), 15.5);
    const n = problem.size;
    const g = expectGradientMatches(problem, x, [0, 5, 40, 77, n - 30, n - 2, n - 1], (a) => 1e-6 * Math.max(1, Math.abs(x[a])));
    // The χN column is really exercised: the cost depends on χN.
    expect(Math.abs(g[n - 1])).toBeGreaterThan(1e-6);
    nets.dispose();
  });

  it('with the period free: the length column matches finite differences of the cost', async () => {
    const { nets, sys } = await smallSystem();
    const t = Float64Array.from({ length: 11 }, (_, i) => 0.13 + 0.35 * i);
    const phi = Float64Array.from(t, (x) => 0.5 + 0.3 * Math.cos((2 * Math.PI * x) / 4.1));
    const grid = new PeriodicCell(4, 8, 1);
    const matrixAt = (L: number) => grid.interpolationMatrix(Float64Array.from(t, (v) => (v * 4) / L), (0.1 * 4) / L);
    const problem = new NetworkInverseProblem(sys, { matrix: matrixAt(4), phi, period: { length: 4, matrixAt } }, 14, 5);
    const x = problem.join(nets.parameters.flatten(), 15.5, 4.2);
    expect(problem.split(x)).toMatchObject({ chiN: 15.5, length: 4.2 });
    const n = problem.size;
    const g = expectGradientMatches(problem, x, [3, 60, n - 2, n - 1], () => 1e-6);
    // The length column is exercised: the cost depends on L (the MDE rows and the data rows).
    expect(Math.abs(g[n - 2])).toBeGreaterThan(1e-6);
    // Held, its column (and χN's) is zero.
    problem.holdChiN = true;
    const held = problem.linearise(x);
    expect(held.g[n - 2]).toBe(0);
    expect(held.g[n - 1]).toBe(0);
    nets.dispose();
  });

  it('data rows split along directions: the gradient matches finite differences; shape weight 1 is the point rows; at 0 the data outside the span do not enter', async () => {
    const { nets, sys } = await smallSystem();
    const t = Float64Array.from({ length: 11 }, (_, i) => 0.13 + 0.35 * i);
    const k = (2 * Math.PI) / 4;
    const phi = Float64Array.from(t, (x) => 0.5 + 0.3 * Math.cos(k * x) + 0.02 * Math.sin(3 * k * x));
    const sigma = Float64Array.from(t, (_, i) => 0.02 + 0.002 * i);
    const directions = [Float64Array.from(t, (x) => Math.sin(k * x)), Float64Array.from(t, (x) => Math.cos(k * x))];
    const grid = new PeriodicCell(4, 8, 1);
    const rows = { matrix: grid.interpolationMatrix(t, 0.1), phi, sigma };
    const make = (shapeWeight: number, data = phi) => new NetworkInverseProblem(sys, { ...rows, phi: data, split: { directions, shapeWeight } }, 14, 5);
    const plain = new NetworkInverseProblem(sys, rows, 14, 5);
    const x = plain.join(nets.parameters.flatten(), 15.5);
    const n = plain.size;
    expectGradientMatches(make(0.3), x, [0, 5, 40, n - 30, n - 1], (a) => 1e-6 * Math.max(1, Math.abs(x[a])));
    // ½|P e|² + ½|(I − P) e|² = ½|e|²: at shape weight 1 the same cost and normal equations.
    const a = plain.linearise(x);
    const b = make(1).linearise(x);
    expect(b.cost).toBeCloseTo(a.cost, 12);
    expect(worstRelative(a.g, b.g)).toBeLessThan(1e-12);
    // … and the same JᵀJ (the gradient alone cannot tell (I − P)J from J: (I − P) is a symmetric projector).
    if (a.kind !== 'normal' || b.kind !== 'normal') throw new Error('expected normal equations');
    expect(worstRelative(a.A, b.A)).toBeLessThan(1e-12);
    // At shape weight 0 a change of the data orthogonal (in the 1/σ² weighting) to both
    // directions leaves the cost as it was; at 0.3 it does not.
    const w = Float64Array.from(sigma, (v) => 1 / (v * v));
    const v = Float64Array.from(t, (x) => Math.cos(3 * k * x));
    // (alternating projections on the two complements: repeated, they converge to the projection on the intersection)
    for (let pass = 0; pass < 60; pass++) {
      for (const d of directions) {
        const dd = d.reduce((s, y, i) => s + w[i] * y * y, 0);
        const vd = v.reduce((s, y, i) => s + w[i] * y * d[i], 0);
        v.forEach((y, i) => (v[i] = y - (vd / dd) * d[i]));
      }
    }
    const moved = Float64Array.from(phi, (p, i) => p + 0.05 * v[i]);
    expect(make(0, moved).cost(x)).toBeCloseTo(make(0).cost(x), 12);
    expect(Math.abs(make(0.3, moved).cost(x) - make(0.3).cost(x))).toBeGreaterThan(1e-6);
    nets.dispose();
  });

  it('the propagator value fit: Jacobian against central differences of its residuals', async () => {
    const { nets, sys } = await smallSystem();
    const theta = nets.parameters.flatten();
    const ns = sys.contourOf('qDagger').length;
    const target = Array.from({ length: ns }, (_, i) => Float64Array.from({ length: 8 }, (_, j) => Math.sin(i + j)));
    const pf = sys.propagatorFit(theta, 'qDagger', target);
    const x = theta.slice(pf.first, pf.first + pf.size);
    expect(worstJacobianColumnError(pf, x, [0, 3, 17, pf.size - 20, pf.size - 1])).toBeLessThan(1e-7);
    nets.dispose();
  });
});

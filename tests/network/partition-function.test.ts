import { describe, expect, it } from 'vitest';
import { buildChain } from '../../src/physics/chain.js';
import { contourFromSteps } from '../../src/physics/contour.js';
import type { Contour } from '../../src/physics/contour.js';
import { correctedPartitionFunction } from '../../src/network/partition-function.js';
import type { SideWithResidual } from '../../src/network/partition-function.js';

// A free homopolymer chain (w = 0, D = 1) in a periodic cell of length L: q = q† = 1 and
// Q = 1 exactly (the Gaussian chain's propagator conserves the mean; common practice, no
// source). Approximate propagators u = ln q̃ = ε s g(x) (q̃(x, 0) = 1 as the networks'
// exact initial condition) have the ln q residual r = ∂u/∂s − (∂²u/∂x² + (∂u/∂x)²) + w in
// closed form, so the adjoint correction can be checked against the exact Q.
const L = 4;
const nx = 48;
const x = Float64Array.from({ length: nx }, (_, j) => (j * L) / nx);
const k = (2 * Math.PI) / L;
const mean = (u: Float64Array) => u.reduce((a, b) => a + b, 0) / u.length;

function side(contour: Contour, eps: number, phase: number): SideWithResidual {
  const g = (t: number) => 0.5 + Math.cos(k * t + phase) + 0.3 * Math.sin(2 * k * t);
  const gx = (t: number) => -k * Math.sin(k * t + phase) + 0.6 * k * Math.cos(2 * k * t);
  const gxx = (t: number) => -k * k * Math.cos(k * t + phase) - 1.2 * k * k * Math.sin(2 * k * t);
  const logQ = Array.from(contour.s, (s) => Float64Array.from(x, (t) => eps * s * g(t)));
  const residual = contour.blocks.map((b) => {
    const r = new Float64Array((b.steps + 1) * nx);
    for (let i = 0; i <= b.steps; i++) {
      const s = contour.s[b.offset + i];
      for (let j = 0; j < nx; j++) r[i * nx + j] = eps * g(x[j]) - (eps * s * gxx(x[j]) + (eps * s * gx(x[j])) ** 2);
    }
    return r;
  });
  return { contour, logQ, residual };
}

describe('adjoint-corrected Q of approximate propagators', () => {
  const chain = buildChain({ type: 'homopolymer', species: 'A' });
  const contour = contourFromSteps(chain, [128]);

  it('with the exact q† the corrected Q is the exact Q = 1 (Giles & Süli 2002: the correction is exact for an exact adjoint)', () => {
    const approx = side(contour, 0.3, 0.4);
    const exact = side(contour, 0, 0);
    const c = correctedPartitionFunction(approx, exact, mean);
    expect(Math.abs(c.endQ - 1)).toBeGreaterThan(1e-2);
    // Only Simpson's rule on 128 intervals stands between the two.
    expect(Math.abs(c.fromQ - 1)).toBeLessThan(1e-7);
  });

  it('with both propagators approximate its error is second order (halving ε quarters it), the end value first order', () => {
    const err = (eps: number) => {
      const c = correctedPartitionFunction(side(contour, eps, 0.4), side(contour, eps, 1.1), mean);
      return { end: Math.abs(c.endQ - 1), fromQ: Math.abs(c.fromQ - 1), fromQDagger: Math.abs(c.fromQDagger - 1) };
    };
    const a = err(0.04);
    const b = err(0.02);
    expect(a.fromQ).toBeLessThan(0.1 * a.end);
    expect(a.fromQ / b.fromQ).toBeGreaterThan(3.5);
    expect(a.fromQ / b.fromQ).toBeLessThan(4.5);
    expect(a.fromQDagger / b.fromQDagger).toBeGreaterThan(3.5);
    expect(a.fromQDagger / b.fromQDagger).toBeLessThan(4.5);
    // g has mean 0.5: ⟨e^{εg}⟩ − 1 ≈ ε/2, first order.
    expect(a.end / b.end).toBeGreaterThan(1.8);
    expect(a.end / b.end).toBeLessThan(2.2);
  });
});

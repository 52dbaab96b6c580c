import { describe, expect, it } from 'vitest';
import { buildChain } from '../../src/physics/chain.js';
import { collocationContours, collocationSteps } from '../../src/physics/contour.js';

// The collocation's contour spread (collocation.contourSpread): where the nodes go, and that
// the quadrature on them stays Simpson's rule per block.
describe('collocation contour spread', () => {
  const chain = buildChain({ type: 'diblock', f: 0.35 });
  const reversed = buildChain({ type: 'diblock', f: 0.65 });

  it("'equal' gives every block nodesPerBlock steps; 'by-length' the same total in proportion to the blocks' lengths", () => {
    expect(collocationSteps(chain, 32, 'equal')).toEqual([32, 32]);
    // 64 steps: 0.35 · 64 = 22.4 → 22 (even), 0.65 · 64 = 41.6 → 42.
    expect(collocationSteps(chain, 32, 'by-length')).toEqual([22, 42]);
    const tri = buildChain({ type: 'triblock', f: 0.5, firstBlockShare: 0.5 });
    expect(collocationSteps(tri, 16, 'by-length')).toEqual([12, 24, 12]);
  });

  it("'by-length': the nodes are uniform on each block with nearly one step h, the junction a node, and q†'s nodes the mirror of q's", () => {
    const { q, qDagger } = collocationContours(chain, reversed, 32, 'by-length', 'collocation.nodesPerBlock');
    expect(q.ns).toBe(64);
    expect(q.blocks.map((b) => b.steps)).toEqual([22, 42]);
    expect(q.s[22]).toBe(0.35);
    for (let i = 0; i <= 22; i++) expect(q.s[i]).toBeCloseTo((0.35 * i) / 22, 14);
    for (let i = 0; i <= 42; i++) expect(q.s[22 + i]).toBeCloseTo(0.35 + (0.65 * i) / 42, 14);
    // Steps on the two blocks within 3 % of each other (0.35/22 against 0.65/42).
    expect(Math.abs(q.blocks[0].h / q.blocks[1].h - 1)).toBeLessThan(0.03);
    expect(qDagger.blocks.map((b) => b.steps)).toEqual([42, 22]);
    for (let i = 0; i <= q.ns; i++) expect(qDagger.s[q.ns - i]).toBeCloseTo(1 - q.s[i], 14);
  });

  it("Simpson's rule on each block stays exact for a cubic (Abramowitz & Stegun 25.4.5: Simpson's rule is exact for polynomials of degree ≤ 3)", () => {
    const p = (s: number) => 1.3 - 2 * s + 4.5 * s * s - 3.2 * s * s * s;
    const integral = (a: number, b: number) => {
      const P = (s: number) => 1.3 * s - s * s + 1.5 * s ** 3 - 0.8 * s ** 4;
      return P(b) - P(a);
    };
    for (const spread of ['equal', 'by-length'] as const) {
      const { q } = collocationContours(chain, reversed, 16, spread, 'collocation.nodesPerBlock');
      const sumA = q.weights.A.reduce((a, w, i) => a + w * p(q.s[i]), 0);
      const sumB = q.weights.B.reduce((a, w, i) => a + w * p(q.s[i]), 0);
      expect(sumA).toBeCloseTo(integral(0, 0.35), 13);
      expect(sumB).toBeCloseTo(integral(0.35, 1), 13);
    }
  });

  it('a short block keeps at least 2 steps (Simpson needs a pair), and an odd nodesPerBlock is refused naming the field', () => {
    const thin = buildChain({ type: 'diblock', f: 0.05 });
    expect(collocationSteps(thin, 4, 'by-length')).toEqual([2, 8]);
    expect(() => collocationContours(chain, reversed, 5, 'equal', 'collocation.nodesPerBlock')).toThrow(/collocation\.nodesPerBlock/);
  });
});

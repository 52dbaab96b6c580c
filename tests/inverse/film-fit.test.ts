/**
 * Recovery of χN and the wall affinities from synthetic film measurements. The data come from
 * a finer film solve (twice the grid points and contour steps of the fit) with seeded noise,
 * so the fit meets data it did not make itself; the truth must lie inside the fit's 95 %
 * profile-likelihood interval (a correct interval misses it in 5 % of noise draws: the seeds
 * here are fixed, and the check is that the interval is honest for them, not tuned to them).
 */
import { describe, expect, it } from 'vitest';
import { fitFilm } from '../../src/inverse/film/film-fit.js';
import { synthesizeFilm } from '../../src/inverse/film/film-synth.js';
import { chain, inside, truth } from './film-truth.js';

// The reflectivity fit is in film-fit-reflectivity.test.ts (a file of its own so that the test
// runner can run the two fits side by side).

describe('film fits', () => {
  it('recovers χN from a noisy composition depth profile, and the signs of both affinities', () => {
    const d = synthesizeFilm({ kind: 'phi', chain, ...truth, wallRange: 0.25, points: 40, noise: 0.02, seed: 5, instrument: {}, nx: 32, ns: 80 });
    const r = fitFilm(
      { kind: 'phi', source: 'synthetic', x: d.x, y: d.y, sigma: d.sigma },
      { model: { chain, nx: 16, ns: 40, wallRange: 0.25 }, thickness: truth.thickness, instrument: {}, chiNRange: [5, 60], affinityRange: [-5, 5], start: { bottom: 1, top: -1 }, intervals: ['chiN'] },
    );
    expect(r.point.layers.sequence).toBe(d.point.layers.sequence);
    const iv = r.intervals.chiN!['95%'];
    expect(inside(truth.chiN, iv), `χN: truth ${truth.chiN} in [${iv.lo}, ${iv.hi}], best ${r.params.chiN}`).toBe(true);
    // An interval that covers everything says nothing: it must be narrower than the search range.
    expect(iv.limitedByRange.lo || iv.limitedByRange.hi).toBe(false);
    // The affinities are weakly determined by a profile (a strongly wetted wall saturates), so
    // only the wall each block wets is checked here.
    expect(Math.sign(r.params.bottom)).toBe(Math.sign(truth.bottom));
    expect(Math.sign(r.params.top)).toBe(Math.sign(truth.top));
    expect(r.reducedChi2).toBeLessThan(2);
    expect(r.warnings).toEqual([]);
  });
});

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

const chain = { type: 'diblock' as const, f: 0.5, segmentRatio: 1 };
// Round SLDs of a deuterated and a protonated block on silicon in air, 10⁻⁶ Å⁻² (from memory).
const slds = { A: 6.0e-6, B: 1.0e-6, substrate: 2.07e-6, medium: 0 };
const truth = { chiN: 16, bottom: 1.0, top: -0.6, thickness: 5, width: 0.25, offset: 0.3 };

function inside(v: number, iv: { lo: number; hi: number }) {
  return v >= iv.lo && v <= iv.hi;
}

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

  it('recovers χN from a noisy reflectivity curve', () => {
    const inst = { slds, rgNm: 6, dQoverQ: 0.05 };
    // R(Q) pins χN far more tightly than a profile does, so the fit's own discretisation must be
    // finer: at 16 points over 5 Rg (a point every 0.31 Rg, coarser than the wall range 0.25 Rg)
    // the 95 % interval was measured at [15.63, 15.99] (80 Q points, same seed and noise), missing
    // the truth 16 by the model's bias.
    const d = synthesizeFilm({ kind: 'reflectivity', chain, ...truth, wallRange: 0.25, points: 60, noise: 0.03, seed: 7, qRange: [0.01, 0.15], instrument: inst, nx: 64, ns: 120 });
    const r = fitFilm(
      { kind: 'reflectivity', source: 'synthetic', x: d.x, y: d.y, sigma: d.sigma },
      { model: { chain, nx: 32, ns: 60, wallRange: 0.25 }, thickness: truth.thickness, instrument: inst, chiNRange: [5, 60], affinityRange: [-5, 5], start: { bottom: 1, top: -1 }, intervals: ['chiN'] },
    );
    const iv = r.intervals.chiN!['95%'];
    expect(inside(truth.chiN, iv), `truth ${truth.chiN} in [${iv.lo}, ${iv.hi}], best ${r.params.chiN}`).toBe(true);
    expect(iv.limitedByRange.lo || iv.limitedByRange.hi).toBe(false);
    expect(r.reducedChi2).toBeLessThan(2);
  });
});

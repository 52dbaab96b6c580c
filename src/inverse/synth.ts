/**
 * Synthetic measured profiles from the reference lamella, for demos and tests: sample the
 * (optionally resolution-blurred) model at evenly spaced points over a number of periods,
 * shifted by an offset, plus seeded Gaussian noise. The equilibrium period comes from the
 * same stress-free search the inversion uses, so a noiseless profile is fitted exactly.
 */
import type { SpectralOptions } from '../io/schemas/spectral-schema.js';
import type { ChainSpec } from '../physics/chain-schema.js';
import { RunFailure } from '../io/errors.js';
import { LamellaModel } from './lamella-model.js';
import type { ModelPoint } from './lamella-model.js';
import { GaussianNoise } from '../numerics/random.js';

export interface SynthSettings {
  chain: ChainSpec;
  chiN: number;
  points: number;
  /** Standard deviation of the added Gaussian noise (0 for a noiseless profile). */
  noise: number;
  seed: number;
  /** Periods covered by the profile (need not be whole). */
  periods: number;
  /** Data position of the centre of an A-rich domain, Rg. */
  offset: number;
  period: 'equilibrium' | number;
  /** Gaussian resolution (standard deviation) in Rg. */
  resolution: number;
  nx: number;
  ns: number;
  solver?: Partial<SpectralOptions>;
}

export interface SynthProfile {
  x: Float64Array;
  phi: Float64Array;
  /** The noiseless (blurred) model at x. */
  clean: Float64Array;
  period: number;
  point: ModelPoint;
}

export function synthesize(s: SynthSettings, model: LamellaModel = new LamellaModel({ chain: s.chain, nx: s.nx, ns: s.ns, options: s.solver })): SynthProfile {
  const point = s.period === 'equilibrium' ? model.equilibrium(s.chiN) : model.at(s.chiN, s.period);
  if (point.phase !== 'lamellar') throw new RunFailure(`synth: the melt is disordered at χN = ${s.chiN} (f = ${model.chain.speciesFraction.A}): no lamellar profile to sample`);
  const L = point.period;
  const span = s.periods * L;
  const x = new Float64Array(s.points);
  for (let i = 0; i < s.points; i++) x[i] = (i * span) / s.points;
  const clean = point.profile.blurred(s.resolution).evaluateShifted(x, s.offset, new Float64Array(s.points));
  const phi = Float64Array.from(clean);
  if (s.noise > 0) {
    const g = new GaussianNoise(s.seed);
    for (let i = 0; i < s.points; i++) phi[i] += s.noise * g.next();
  }
  return { x, phi, clean, period: L, point };
}

/** The CSV the inversion reads: x, phiA and, for a noisy profile, sigma. */
export function synthCsv(p: SynthProfile, noise: number, xScale = 1): string {
  const rows = [noise > 0 ? 'x,phiA,sigma' : 'x,phiA'];
  for (let i = 0; i < p.x.length; i++) {
    const cells = [String(p.x[i] * xScale), String(p.phi[i])];
    if (noise > 0) cells.push(String(noise));
    rows.push(cells.join(','));
  }
  return `${rows.join('\n')}\n`;
}

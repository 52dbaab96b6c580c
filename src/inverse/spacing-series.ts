/**
 * χ and the statistical segment length b from the lamellar period D measured for several
 * chain lengths N of the same chemistry at one temperature, through the reference's
 * equilibrium period L_eq(χN) (in Rg, lamella-model.ts):
 *   D_i = L_eq(χ N_i) · Rg_i,   Rg_i = b sqrt(N_i/6).
 * Units: D and b in nm; χ per reference segment (N counts reference segments).
 *
 * b enters linearly: for each χ it is the weighted least-squares solution. χ has a
 * profile-likelihood interval (profile-likelihood.ts on χ²(χ) = min_b Σ ((D_i − model)/dD_i)²,
 * levels of confidence.ts, with t levels when dD is estimated from the scatter); b's
 * interval is the range of b over the χ interval together with its conditional standard
 * error at each end (a simple bound, said so in the output). Every N_i must be ordered in
 * mean field (χN_i above the spinodal) over the whole search range.
 */
import { InputError } from '../io/errors.js';
import type { ChainSpec } from '../physics/chain-schema.js';
import type { SpectralOptions } from '../io/schemas/spectral-schema.js';
import { buildChain } from '../physics/chain.js';
import { spinodal } from '../physics/rpa.js';
import { deltaChi2Level, LEVELS } from './confidence.js';
import { LamellaModel } from './lamella-model.js';
import type { ProfiledPoint } from './profile-likelihood.js';
import { intervalEnd, refineMinimum, scanMinimum } from './profile-likelihood.js';

export interface SpacingData {
  source: string;
  N: number[];
  /** D in nm. */
  D: number[];
  dD?: number[];
}

export interface SpacingFit {
  chi: number;
  b: number;
  intervals: Record<'68.3%' | '95%', { chi: [number, number]; b: [number, number]; limitedByRange: { lo: boolean; hi: boolean } }>;
  chi2: number;
  dof: number;
  sigma: { source: 'column' | 'estimated'; value: number | null };
  model: { N: number; chiN: number; periodRg: number; D: number }[];
  chiRange: [number, number];
  /** Δχ²(χ) on the points evaluated (in the units of the levels: divided by the estimated σ² without dD). */
  profile: { chi: number; deltaChi2: number }[];
  evaluations: number;
  notes: string[];
  seconds: number;
}

export function fitSpacingSeries(data: SpacingData, s: { chain: ChainSpec; nx: number; ns: number; options?: Partial<SpectralOptions>; chiRange?: [number, number]; maxChiN?: number; onEvaluation?: (evaluations: number, chi: number, chi2: number) => void }): SpacingFit {
  const t0 = performance.now();
  const n = data.N.length;
  if (n < 3) throw new InputError(`${data.source}: ${n} chain length(s); χ and b need at least three (two unknowns and one degree of freedom)`);
  const chiNs = spinodal(buildChain(s.chain)).chiN;
  const nMin = Math.min(...data.N);
  const nMax = Math.max(...data.N);
  const range: [number, number] = s.chiRange ?? [(1.05 * chiNs) / nMin, (s.maxChiN ?? 60) / nMax];
  if (!(range[0] < range[1])) throw new InputError(`${data.source}: N from ${nMin} to ${nMax} cannot all be ordered below χN = ${s.maxChiN ?? 60}: no χ range keeps every sample lamellar in this model`);
  const model = new LamellaModel({ chain: s.chain, nx: s.nx, ns: s.ns, options: s.options });
  const w = data.dD ? data.dD.map((d) => 1 / (d * d)) : data.D.map(() => 1);
  const basis = (chi: number) => data.N.map((N) => model.equilibrium(chi * N).period * Math.sqrt(N / 6));
  const cache = new Map<number, ProfiledPoint & { b: number; bVar: number; x: number[] }>();
  const fn = (chi: number) => {
    const hit = cache.get(chi);
    if (hit) return hit;
    const x = basis(chi);
    let sxx = 0;
    let sxy = 0;
    for (let i = 0; i < n; i++) {
      sxx += w[i] * x[i] * x[i];
      sxy += w[i] * x[i] * data.D[i];
    }
    const b = sxy / sxx;
    let v = 0;
    for (let i = 0; i < n; i++) v += w[i] * (data.D[i] - b * x[i]) ** 2;
    const out = { chiN: chi, value: v, b, bVar: 1 / sxx, x };
    cache.set(chi, out);
    s.onEvaluation?.(cache.size, chi, v);
    return out;
  };
  const search = { range, rangeSource: 'χ range', scanPoints: 8, relTol: 1e-7 };
  let best;
  try {
    best = fn(refineMinimum(fn, search, scanMinimum(fn, search, 1e-5), 2e-3).chiN);
  } catch (e) {
    if (!(e instanceof InputError)) throw e;
    const upper = /upper bound/.test(e.message);
    throw new InputError(
      `${data.source}: the best χ runs to the ${upper ? 'upper' : 'lower'} end of its search range [${range[0].toPrecision(4)}, ${range[1].toPrecision(4)}] (${upper ? `χN = ${s.maxChiN ?? 60} at the largest N` : '5 % above the spinodal at the smallest N'}): D grows with N ${upper ? 'faster' : 'more slowly'} than mean-field lamellae allow in that range; check the units of D and N, or give --chi-range`,
    );
  }
  const dof = n - 2;
  const scale = data.dD ? 1 : Math.max(best.value / dof, 1e-30);
  const notes: string[] = [];
  if (!data.dD) notes.push('no dD column: the scatter of D about the model sets the uncertainty (t-distribution levels)');
  const intervals = {} as SpacingFit['intervals'];
  const known = () => [...cache.values()];
  for (const level of LEVELS) {
    const d = deltaChi2Level(level, !data.dD, dof);
    const hi = intervalEnd(fn, best, d * scale, 1, range, known());
    const lo = intervalEnd(fn, best, d * scale, -1, range, known());
    const ends = [fn(lo.chiN), fn(hi.chiN), best];
    const z = Math.sqrt(d);
    const bLo = Math.min(...ends.map((e) => e.b - z * Math.sqrt(e.bVar * scale)));
    const bHi = Math.max(...ends.map((e) => e.b + z * Math.sqrt(e.bVar * scale)));
    intervals[level.name] = { chi: [lo.chiN, hi.chiN], b: [bLo, bHi], limitedByRange: { lo: lo.limitedByRange, hi: hi.limitedByRange } };
    if (lo.limitedByRange || hi.limitedByRange) notes.push(`the ${level.name} χ interval reaches the search range bound: open on that side`);
  }
  notes.push("b's interval is the envelope of b ± its conditional standard error over the χ interval (a simple bound, not a joint region)");
  notes.push('mean-field periods: fluctuations and chain-end effects near the ODT make measured D grow faster with N than mean field predicts, which biases χ high for the shortest chains');
  return {
    chi: best.chiN,
    b: best.b,
    intervals,
    chi2: best.value / scale,
    dof,
    sigma: data.dD ? { source: 'column', value: null } : { source: 'estimated', value: Math.sqrt(scale) },
    model: data.N.map((N, i) => ({ N, chiN: best.chiN * N, periodRg: best.x[i] / Math.sqrt(N / 6), D: best.b * best.x[i] })),
    chiRange: range,
    profile: known()
      .filter((p) => Number.isFinite(p.value))
      .sort((p, q) => p.chiN - q.chiN)
      .map((p) => ({ chi: p.chiN, deltaChi2: (p.value - best.value) / scale })),
    evaluations: cache.size,
    notes,
    seconds: (performance.now() - t0) / 1000,
  };
}

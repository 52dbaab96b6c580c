/**
 * Synthetic small-angle scattering of a disordered diblock melt, computed independently of
 * src/physics/rpa.ts (tests only).
 */
import type { ScatteringData } from '../../src/inverse/scattering/scattering-csv.js';
import { GaussianNoise } from '../../src/numerics/random.js';

/**
 * S/N of a diblock melt written here independently of src/physics/rpa.ts, from the Debye
 * function of a Gaussian block: g(h, x) = 2(hx + e^{−hx} − 1)/x², S_AA = g(f), S_BB = g(1 − f),
 * S_AB = [g(1) − g(f) − g(1 − f)]/2, N/S = (S_AA + S_BB + 2 S_AB)/(S_AA S_BB − S_AB²) − 2χN
 * (Leibler, Macromolecules 13, 1602 (1980)).
 */
export function debyeSOverN(f: number, chiN: number, x: number): number {
  const g = (h: number) => (2 * (h * x + Math.exp(-h * x) - 1)) / (x * x);
  const aa = g(f);
  const bb = g(1 - f);
  const ab = (g(1) - g(f) - g(1 - f)) / 2;
  return 1 / ((aa + bb + 2 * ab) / (aa * bb - ab * ab) - 2 * chiN);
}

/** Synthetic I(q) from the independent Debye computation; resolution by a fine Simpson rule over ±6σ. */
export function syntheticScattering(o: { f: number; chiN: number; rg: number; K: number; bg: number; noise: number; seed: number; resolution?: number; n?: number; qMax?: number }): ScatteringData {
  const n = o.n ?? 80;
  const qMax = o.qMax ?? 1.0;
  const q = Float64Array.from({ length: n }, (_, i) => 0.04 + ((qMax - 0.04) * i) / (n - 1));
  const exact = (qq: number) => o.K * debyeSOverN(o.f, o.chiN, (qq * o.rg) ** 2) + o.bg;
  const smeared = (qq: number) => {
    const s = o.resolution ?? 0;
    if (s === 0) return exact(qq);
    const m = 600;
    let num = 0;
    let den = 0;
    for (let k = 0; k <= m; k++) {
      const t = -6 + (12 * k) / m;
      const w = (k === 0 || k === m ? 1 : k % 2 ? 4 : 2) * Math.exp(-0.5 * t * t);
      const qq2 = qq + t * s;
      if (qq2 <= 0) continue;
      num += w * exact(qq2);
      den += w;
    }
    return num / den;
  };
  const noise = new GaussianNoise(o.seed);
  const clean = q.map(smeared);
  const sigma = clean.map((v) => o.noise * v);
  const I = clean.map((v, i) => (o.noise > 0 ? v + sigma[i] * noise.next() : v));
  return { source: 'synthetic.csv', q, qRaw: q, qUnit: 'per_nm', toPerNm: 1, intensity: I, sigma: o.noise > 0 ? sigma : clean.map((v) => 0.02 * v), lines: [] };
}

/** The same as a CSV file (q_per_nm, I, dI). */
export function scatteringCsv(d: ScatteringData): string {
  return `q_per_nm,I,dI\n${Array.from(d.q, (q, i) => `${q},${d.intensity[i]},${d.sigma![i]}`).join('\n')}\n`;
}

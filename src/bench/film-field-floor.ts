/**
 * `npm run bench -- --film-field-floor [--config FILE]`: what a linear field network can hold on
 * a film, measured with the spectral solver alone (seconds). The film reference's smooth fields
 * (w_A + h, w_B − h: the network adds the walls' field h after its layer) are fitted by linear
 * least squares on the reference grid to M cosine modes and a constant, with and without the
 * two wall profiles (the film's network features, physics/cell/film-cell.ts); the walls' field
 * is added back and the MDE solved once in that field (solveInFields). Printed: the largest
 * field error (kT per chain) and φ_A's relative L2 error against the reference. Also the
 * contour quadrature's floor as in discretisation-floor.ts: Simpson's rule on K nodes per block
 * from propagators 16 times finer, against the fine rule, overall and in the eighth of the film
 * at each wall. Default config: configs/film-asymmetric-chiN15.train.json.
 * Units: z in Rg, w in kT per chain.
 */
import { readFileSync } from 'node:fs';
import { trainConfigSchema } from '../io/schemas/train-config.js';
import { cellFeatureArrays } from '../network/features.js';
import { linearLeastSquares } from '../numerics/dense-solve.js';
import { buildChain } from '../physics/chain.js';
import { contourFromSteps, densitiesFromPropagators } from '../physics/contour.js';
import type { NetworkFeatures } from '../physics/cell/cell.js';
import { PropagatorSolver } from '../spectral/propagator-solver.js';
import { solveInFields } from '../spectral/scft-solver.js';
import { solveFromConfig } from '../spectral/solve-from-config.js';
import { relL2 } from '../physics/solution-metrics.js';

function maxAbs(a: ArrayLike<number>, b: ArrayLike<number>, from = 0, to = a.length): number {
  let m = 0;
  for (let j = from; j < to; j++) m = Math.max(m, Math.abs(a[j] - b[j]));
  return m;
}

export function runFilmFieldFloor(): void {
  const i = process.argv.indexOf('--config');
  const file = i > 0 ? process.argv[i + 1] : 'configs/film-asymmetric-chiN15.train.json';
  const config = trainConfigSchema.parse(JSON.parse(readFileSync(file, 'utf8')));
  if (config.cell.kind !== 'film') throw new Error(`${file}: cell.kind is not "film"`);
  const ref = solveFromConfig({ system: config.system, cell: config.cell, solver: config.solver, output: { propagators: false } }).solution;
  const cell = ref.cell;
  const x = cell.x;
  const h = cell.surfaceField ?? new Float64Array(x.length);
  const smooth = [Float64Array.from(ref.w.A, (v, j) => v + h[j]), Float64Array.from(ref.w.B, (v, j) => v - h[j])];
  console.log(`\nlinear field network on a film (${file}: H = ${cell.length} Rg, ${x.length} points): fit of the reference's fields, φA of the MDE in the fit`);
  const rows = ['| cosine modes | max field error, with wall profiles / without (kT) | φA relative L2, with / without |', '|---|---|---|'];
  for (const M of [12, 16, 20, 24, 31, 40]) {
    const cells = [true, false].map((walls) => {
      const features: NetworkFeatures = walls ? cell.features : { ...cell.features, extra: undefined };
      const f = cellFeatureArrays(x, features, M);
      if (f.width + 1 > x.length) return null;
      const coef = linearLeastSquares(x.length, f.width + 1, (j, row) => {
        row.set(f.v.subarray(j * f.width, (j + 1) * f.width));
        row[f.width] = 1;
      }, smooth);
      if (!coef[0] || !coef[1]) return null;
      const fit = coef.map((c) => Float64Array.from(x, (_, j) => {
        let s = c![f.width];
        for (let k = 0; k < f.width; k++) s += f.v[j * f.width + k] * c![k];
        return s;
      }));
      const w = { A: fit[0].map((v, j) => v - h[j]), B: fit[1].map((v, j) => v + h[j]) };
      const s = solveInFields({ system: config.system, cell, contour: ref.contour, fields: w });
      return { field: Math.max(maxAbs(w.A, ref.w.A), maxAbs(w.B, ref.w.B)), phi: relL2(s.phi.A, ref.phi.A) };
    });
    const show = (k: 'field' | 'phi') => cells.map((c) => (c ? c[k].toExponential(1) : 'singular')).join(' / ');
    rows.push(`| ${M} | ${show('field')} | ${show('phi')} |`);
  }
  console.log(rows.join('\n'));

  const FINE = 16;
  const chain = buildChain(config.system.chain);
  const n = x.length;
  const e = Math.max(1, Math.floor(n / 8));
  const phiIn = (steps: number) => {
    const s = new PropagatorSolver(chain, cell, contourFromSteps(chain, chain.blocks.map(() => steps)));
    s.setFields(ref.w);
    return s.solve();
  };
  const q = ['| nodes per block | φA relative L2 | max |φA| error, bottom eighth / top eighth |', '|---|---|---|'];
  for (const K of [8, 16, 32]) {
    const d = phiIn(K * FINE);
    const fine = densitiesFromPropagators(contourFromSteps(chain, chain.blocks.map(() => K * FINE)), d.q, d.qDagger, d.Q);
    const coarse = contourFromSteps(chain, chain.blocks.map(() => K));
    const every = (u: Float64Array[]) => Array.from({ length: coarse.ns + 1 }, (_, k) => u[k * FINE]);
    const c = densitiesFromPropagators(coarse, every(d.q), every(d.qDagger), d.Q);
    q.push(`| ${K} | ${relL2(c.A, fine.A).toExponential(1)} | ${maxAbs(c.A, fine.A, 0, e).toExponential(1)} / ${maxAbs(c.A, fine.A, n - e, n).toExponential(1)} |`);
  }
  console.log('\ncontour quadrature of φ on the film (Simpson on K nodes per block against 16·K, exact fields)');
  console.log(q.join('\n'));
}

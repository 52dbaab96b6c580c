/**
 * `npm run bench -- --discretisation-floor`: two floors that the second-order recipe's
 * discretisation puts under the networks' φ_A error, whatever the networks learn, measured
 * with the spectral solver alone (seconds):
 *  - the field: a field network linear in M Fourier modes holds the reference's w_A, w_B only
 *    up to mode M; the φ_A of the exact MDE in that truncated field, against the reference's;
 *  - the contour quadrature: the field steps take φ from Simpson's rule on the phase's
 *    contour nodes (K steps per block); φ_A by that rule from exact propagators (a solve on
 *    16·K steps per block, every 16th node kept), against the reference's.
 * Both as the relative L2 error of φ_A on the reference's grid (the bench systems with a
 * field network: every recipe system but the chain in a prescribed field).
 * Units: x in Rg, w in kT per chain.
 */
import { trainConfigSchema } from '../io/schemas/train-config.js';
import { buildChain } from '../physics/chain.js';
import { PeriodicCell } from '../physics/cell/periodic-cell.js';
import { contourFromSteps, densitiesFromPropagators } from '../physics/contour.js';
import type { SpeciesArrays } from '../physics/fields.js';
import { PropagatorSolver } from '../spectral/propagator-solver.js';
import { solveFromConfig } from '../spectral/solve-from-config.js';
import { RECIPE_SYSTEMS, recipeConfig } from './recipe-bench.js';
import { relL2 } from '../physics/solution-metrics.js';

/** u on the grid with its Fourier modes above M removed (n points, a discrete Fourier sum). */
function truncated(u: Float64Array, M: number): Float64Array {
  const n = u.length;
  const out = new Float64Array(n);
  for (let k = 0; k <= M && k <= n / 2; k++) {
    let a = 0;
    let b = 0;
    for (let j = 0; j < n; j++) {
      const t = (2 * Math.PI * k * j) / n;
      a += u[j] * Math.cos(t);
      b += u[j] * Math.sin(t);
    }
    const s = k === 0 || k === n / 2 ? 1 / n : 2 / n;
    for (let j = 0; j < n; j++) {
      const t = (2 * Math.PI * k * j) / n;
      out[j] += s * (a * Math.cos(t) + b * Math.sin(t));
    }
  }
  return out;
}

export function runDiscretisationFloor(): void {
  const FINE = 16;
  console.log('\ndiscretisation floors of the second-order recipe: φA relative L2 against the spectral reference');
  const rows = ['| system | field: 8 / 12 / 16 / 20 Fourier modes | Simpson: 8 / 16 / 24 / 32 steps per block |', '|---|---|---|'];
  for (const b of RECIPE_SYSTEMS.filter((s) => !s.cold)) {
    const config = trainConfigSchema.parse(recipeConfig(b, 'second-order', 1, false));
    const ref = solveFromConfig({ system: config.system, cell: config.cell, solver: config.solver, output: { propagators: false } }).solution;
    const chain = buildChain(config.system.chain);
    const cell = new PeriodicCell(ref.length, ref.x.length, ref.periods || 1);
    const phiIn = (w: SpeciesArrays, steps: number) => {
      const s = new PropagatorSolver(chain, cell, contourFromSteps(chain, chain.blocks.map(() => steps)));
      s.setFields(w);
      return s.solve();
    };
    const field = [8, 12, 16, 20].map((M) => relL2(phiIn({ A: truncated(ref.w.A, M), B: truncated(ref.w.B, M) }, 64).phi.A, ref.phi.A));
    const quadrature = [8, 16, 24, 32].map((K) => {
      const d = phiIn(ref.w, K * FINE);
      const coarse = contourFromSteps(chain, chain.blocks.map(() => K));
      const every = (q: Float64Array[]) => Array.from({ length: coarse.ns + 1 }, (_, i) => q[i * FINE]);
      return relL2(densitiesFromPropagators(coarse, every(d.q), every(d.qDagger), d.Q).A, ref.phi.A);
    });
    const f = (v: number[]) => v.map((x) => x.toExponential(1)).join(' / ');
    rows.push(`| ${b.name} | ${f(field)} | ${f(quadrature)} |`);
  }
  console.log(rows.join('\n'));
}

/**
 * `npm run bench -- --stall-analysis --systems=NAME [--seed=N] [--override=JSON]`: where the
 * second-order recipe's error sits at the end of a run of one bench system (issue 16). The
 * recipe of recipe-bench.ts is trained (one seed; `--override` is merged into its config, e.g.
 * `{"training":{"secondOrderIterations":240}}`), and the kept state is taken apart:
 *  - field against propagators: the exact MDE (the spectral propagator solver on the
 *    reference's contour) solved in the network's own field w gives φ_exact(w); then
 *    ‖φ_exact(w) − φ_ref‖ is the part the field carries, ‖φ_net − φ_exact(w)‖ the part the
 *    propagator networks carry (relative L2 of φ_A);
 *  - per propagator and block: the RMS and max of ln q_net − ln q_exact(w) (in the network's
 *    field, so it is the networks' own MDE error, not the field's), and where the max sits;
 *  - per region in x: the φ_A error at the A–B interfaces (where 0.25 < φ_A,ref < 0.75)
 *    against the domains;
 *  - the field steps' max |d| (kT) and the final loss terms.
 * Units: x in Rg, w in kT per chain, s the chain contour in [0, 1].
 */
import { trainConfigSchema } from '../io/schemas/train-config.js';
import type { TrainConfigInput } from '../io/schemas/train-config.js';
import { trainRun } from '../training/train-run.js';
import { buildChain } from '../physics/chain.js';
import { PropagatorSolver } from '../spectral/propagator-solver.js';
import { relL2 } from '../physics/solution-metrics.js';
import { RECIPE_SYSTEMS, mergedConfig, recipeConfig } from './recipe-bench.js';

function rms(v: number[]): number {
  return Math.sqrt(v.reduce((a, x) => a + x * x, 0) / Math.max(1, v.length));
}

export async function runStallAnalysis(): Promise<void> {
  const arg = (k: string) => process.argv.find((a) => a.startsWith(`--${k}=`))?.slice(k.length + 3);
  const name = arg('systems') ?? 'diblock-f0.35-chiN22';
  const seed = Number(arg('seed') ?? 1);
  const system = RECIPE_SYSTEMS.find((s) => s.name === name);
  if (!system) throw new Error(`--systems=${name}: allowed: ${RECIPE_SYSTEMS.map((s) => s.name).join(', ')}`);
  const override = arg('override') ? JSON.parse(arg('override')!) : {};
  const input = mergedConfig(recipeConfig(system, 'second-order', seed, false), override) as TrainConfigInput;
  const config = trainConfigSchema.parse(input);
  const t0 = performance.now();
  const r = await trainRun({
    config,
    backend: 'wasm',
    onSecondOrder: (p) => {
      if (p.phiError !== undefined) process.stderr.write(`stall-analysis: iteration ${p.iteration}/${p.iterations}, loss ${p.loss.toExponential(3)}, φA ${p.phiError.toExponential(3)}, ${((performance.now() - t0) / 1000).toFixed(0)} s\n`);
    },
  });
  const ref = r.reference;
  const net = r.network;
  console.log(`\nstall analysis: ${name}, seed ${seed}, override ${JSON.stringify(override)}`);
  console.log(`kept state: ${JSON.stringify(r.metrics.training.holds)}`);
  console.log(`φA relative L2 ${r.metrics.errors.phiA.relativeL2.toExponential(3)}, F error ${r.metrics.errors.freeEnergyError.toExponential(2)} kT, wA − wB ${r.metrics.errors.exchangeField.relativeL2.toExponential(2)}`);
  const steps = r.metrics.training.secondOrder?.fieldSteps ?? [];
  console.log(`field steps max |d| (kT): ${steps.map((s) => `${s.residual.toExponential(2)} (after ${s.afterIteration}, move ${s.move?.toExponential(2)})`).join(', ')}`);
  const last = r.history.filter((h) => h.stage === 'second-order').pop();
  if (last) console.log(`last iteration's loss terms: ${Object.entries(last.terms).map(([k, v]) => `${k} ${(v as number).toExponential(2)}`).join(', ')}`);

  // The exact MDE in the network's own field, on the reference's contour.
  const chain = buildChain(config.system.chain);
  const solver = new PropagatorSolver(chain, ref.cell, ref.contour);
  solver.setFields(net.w);
  const exact = solver.solve();
  const exQ = exact.q.map((a) => Float64Array.from(a));
  const exQd = exact.qDagger.map((a) => Float64Array.from(a));
  console.log(
    `φA error split: field (exact MDE in the network's w against the reference) ${relL2(exact.phi.A, ref.phi.A).toExponential(2)}; ` +
      `propagators (network φA against the exact MDE in its own w) ${relL2(net.phi.A, exact.phi.A).toExponential(2)}`,
  );

  // Where in x: interfaces against domains.
  const n = ref.nx;
  const interfaceIdx = [...Array(n).keys()].filter((j) => ref.phi.A[j] > 0.25 && ref.phi.A[j] < 0.75);
  const domainIdx = [...Array(n).keys()].filter((j) => !(ref.phi.A[j] > 0.25 && ref.phi.A[j] < 0.75));
  const errAt = (idx: number[], u: Float64Array, v: Float64Array) => rms(idx.map((j) => u[j] - v[j]));
  console.log(
    `φA error RMS at the interfaces (${interfaceIdx.length} of ${n} points): network ${errAt(interfaceIdx, net.phi.A, ref.phi.A).toExponential(2)}, propagator part ${errAt(interfaceIdx, net.phi.A, exact.phi.A).toExponential(2)}; ` +
      `in the domains (${domainIdx.length}): network ${errAt(domainIdx, net.phi.A, ref.phi.A).toExponential(2)}, propagator part ${errAt(domainIdx, net.phi.A, exact.phi.A).toExponential(2)}`,
  );

  // Where in s: ln q_net − ln q_exact(w) per propagator and block.
  const p = net.propagators;
  if (p && p.q.length === exQ.length) {
    const ns = ref.contour.ns;
    const sides: [string, Float64Array[], Float64Array[], number[]][] = [
      ['q', p.q, exQ, chain.blocks.map((_, b) => b)],
      ['q†', p.qDagger, exQd, chain.blocks.map((_, b) => b).reverse()],
    ];
    for (const [label, nq, eq, order] of sides) {
      let i0 = 0;
      const parts: string[] = [];
      for (const b of order) {
        const blk = ref.contour.blocks[b];
        const d: number[] = [];
        let max = 0;
        let at = { x: 0, s: 0 };
        for (let i = i0; i <= i0 + blk.steps && i <= ns; i++) {
          for (let j = 0; j < n; j++) {
            const e = Math.log(nq[i][j]) - Math.log(eq[i][j]);
            d.push(e);
            if (Math.abs(e) > max) {
              max = Math.abs(e);
              at = { x: ref.x[j], s: i };
            }
          }
        }
        i0 += blk.steps;
        parts.push(`block ${b + 1} (${chain.blocks[b].species}, ${(chain.blocks[b].end - chain.blocks[b].start).toFixed(2)}): RMS ${rms(d).toExponential(2)}, max ${max.toExponential(2)} at x ${at.x.toFixed(2)} Rg, node ${at.s} of ${ns} from its start`);
      }
      console.log(`ln ${label} error in the network's own field: ${parts.join('; ')}`);
    }
  } else console.log('no network propagators on the reference contour to compare');
  console.log(`training ${r.metrics.training.seconds.toFixed(0)} s (wall, shared machine)`);
}

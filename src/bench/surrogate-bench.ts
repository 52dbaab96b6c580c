/**
 * Timing and accuracy of the parametric surrogate (issue 6), not a test: prints figures,
 * never fails on a time. On χN ∈ [12, 20], f = 0.5 (configs/diblock-chiN12-20.surrogate.json
 * with 8 random held-out points besides the 4 anchor-cell centres):
 *  1. held-out error over the range, against the anchors' interpolated profiles;
 *  2. one query (after start-up) against one reference solve at the same point: at the
 *     equilibrium period, at a given period from the cosine start, and at a given period
 *     warm-started from the nearest anchor's fields; and a `predict` call from the shell;
 *  3. the time that built the surrogate, in reference solves;
 *  4. what each part of the training adds: anchors only or with extra solves, with and
 *     without physics rounds.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { loadJsonFile } from '../io/load-json.js';
import { surrogateConfigSchema } from '../io/schemas/surrogate-config.js';
import type { SurrogateConfig } from '../io/schemas/surrogate-config.js';
import { solveFromConfig } from '../spectral/solve-from-config.js';
import { solveReference } from '../surrogate/reference-solves.js';
import { surrogateRun } from '../surrogate/surrogate-run.js';
import { timeIt } from './timing.js';

const sci = (v: number) => v.toExponential(2);

function exampleConfig(): SurrogateConfig {
  const path = fileURLToPath(new URL('../../configs/diblock-chiN12-20.surrogate.json', import.meta.url));
  const c = loadJsonFile(path, surrogateConfigSchema);
  return { ...c, backend: 'wasm', evaluation: { ...c.evaluation, random: 8 } };
}

export async function runSurrogateBench(): Promise<void> {
  const config = exampleConfig();
  const dir = join(mkdtempSync(join(tmpdir(), 'mesofield-bench-surrogate-')), 'ck');
  console.log('\nparametric surrogate, χN in [12, 20], f = 0.5 (configs/diblock-chiN12-20.surrogate.json, 12 held-out points), wasm:');
  const t0 = performance.now();
  const r = await surrogateRun({ config, outDir: dir });
  const wall = (performance.now() - t0) / 1000;
  const m = r.metrics;
  const e = m.errors;
  const t = m.timing;
  console.log(`  held-out φA relative L2: max ${sci(e.phiARelativeL2.max)}, mean ${sci(e.phiARelativeL2.mean)}; |F error| max ${sci(e.freeEnergyError.max)} kT; Q relative error max ${sci(e.QRelativeError.max)}; period error max ${sci(e.periodRelativeError.max)}`);
  console.log(`  the 5 anchors' reference profiles interpolated linearly in χN (no network): φA max ${sci(e.anchorInterpolationPhiA.max)}, mean ${sci(e.anchorInterpolationPhiA.mean)}`);

  // One query against one reference solve at the same point, each the median of repeats.
  const space = r.model.space;
  const p = { chiN: 17.3, f: 0.5, segmentRatio: 1 };
  const query = timeIt(() => r.model.solutions([p]), 20, 3);
  const fieldsOnly = timeIt(() => r.model.fields([p], config.cell.nx), 20, 3);
  const optimised = timeIt(() => solveReference(space, config, p, { role: 'bench point' }), 3, 0);
  const L = r.model.period(p);
  // Timed through the library call itself: from the cosine start a fixed-period solve may collapse (its phase is printed).
  let coldPhase = '';
  const cold = timeIt(() => {
    coldPhase = solveFromConfig({ system: space.system(p), cell: { kind: 'periodic', period: L, periods: 1, nx: config.cell.nx, ns: config.cell.ns }, solver: config.solver, output: { propagators: false } }).solution.phase;
  }, 5, 1);
  const nearest = r.anchors.reduce((a, b) => (Math.abs(b.point.chiN - p.chiN) < Math.abs(a.point.chiN - p.chiN) ? b : a));
  const warm = timeIt(() => solveReference(space, config, p, { period: L, initial: nearest.solution.w, role: 'bench point' }), 5, 1);
  console.log(`  one query at χN = 17.3 after start-up: ${query.toFixed(2)} ms (of which the field network ${fieldsOnly.toFixed(2)} ms, the rest the float64 propagator solve)`);
  console.log(`  one reference solve at χN = 17.3: equilibrium period ${optimised.toFixed(0)} ms (×${(optimised / query).toFixed(0)}); given period from the cosine start ${cold.toFixed(1)} ms (×${(cold / query).toFixed(0)}; it ends ${coldPhase}); given period from the nearest anchor's fields ${warm.toFixed(1)} ms (×${(warm / query).toFixed(1)})`);
  const cli = fileURLToPath(new URL('../cli/main.js', import.meta.url));
  const s0 = performance.now();
  const run = spawnSync(process.execPath, [cli, 'predict', dir, '--chiN', '17.3'], { encoding: 'utf8' });
  const shell = (performance.now() - s0) / 1000;
  const reported = /query ([\d.]+) ms/.exec(run.stderr)?.[1] ?? '?';
  console.log(`  mesofield predict from the shell: ${shell.toFixed(2)} s wall (Node, tfjs and weights start-up; its first query ${reported} ms, kernels not yet warm)`);
  console.log(
    `  building: ${t.buildSeconds.toFixed(1)} s (anchors ${t.anchorSeconds.toFixed(1)} s, ${t.extraSolves.count} extra solves ${t.extraSolves.seconds.toFixed(1)} s, fit ${t.fitSeconds.toFixed(1)} s, rounds ${t.roundsSeconds.toFixed(1)} s) = ${t.equivalentReferenceSolves.toFixed(1)} reference solves at the equilibrium period (median ${(1000 * t.referenceSolveSeconds).toFixed(0)} ms); held-out check ${t.heldOutSeconds.toFixed(1)} s; run wall ${wall.toFixed(1)} s`,
  );
  r.model.dispose();

  console.log('  what each part adds (same anchors, same held-out points):');
  const variants: [string, Partial<SurrogateConfig['warmStart']>, Partial<SurrogateConfig['training']>][] = [
    ['anchors only, fit only', {}, { rounds: 0 }],
    ['anchors only, fit + 30 physics rounds', {}, { rounds: 30 }],
    ['anchors + 16 extra solves, fit only', { extraSolves: 16 }, { rounds: 0 }],
    ['anchors + 16 extra solves, fit + 10 rounds', { extraSolves: 16 }, {}],
    ['anchors + 8 adaptive solves, fit only', { adaptiveSolves: 8 }, { rounds: 0 }],
  ];
  for (const [label, ws, tr] of variants) {
    const v = await surrogateRun({ config: { ...config, warmStart: { ...config.warmStart, ...ws }, training: { ...config.training, ...tr } } });
    const ve = v.metrics.errors;
    console.log(`    ${label.padEnd(42)} φA max ${sci(ve.phiARelativeL2.max)}, mean ${sci(ve.phiARelativeL2.mean)}; |F error| max ${sci(ve.freeEnergyError.max)} kT; built in ${v.metrics.timing.buildSeconds.toFixed(1)} s`);
    v.model.dispose();
  }
  console.log(`    ${'anchors only, fit + 10 physics rounds'.padEnd(42)} (the example config, above)`);
}

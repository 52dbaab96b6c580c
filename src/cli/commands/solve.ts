/** `mesofield solve`: one spectral reference solve, from a config file and/or flags. */
import type { Command } from 'commander';
import { join } from 'node:path';
import { InputError, RunFailure, asInputError } from '../../io/errors.js';
import { solveConfigSchema } from '../../io/schemas/solve-config.js';
import type { SolveConfig } from '../../io/schemas/solve-config.js';
import { propagatorCsv, solutionFileSchema, solutionGridCsv, solutionText, solutionToFile, summarize } from '../../io/formats/solution.js';
import { solutionSummaryLines } from '../../io/solution-text.js';
import type { OutputDirectory } from '../../io/output-directory.js';
import { claimOut, withOutput, writeFailedOutput } from '../run-output.js';
import { provenance } from '../../io/versions.js';
import { filmSummary, filmSummaryText } from '../../spectral/film-summary.js';
import { filmScanText, parseScanRange, runFilmScan } from '../../spectral/film-scan-run.js';
import type { FilmScanResult } from '../../spectral/film-scan-run.js';
import { solveFromConfig } from '../../spectral/solve-from-config.js';
import { action, parseDecimal } from '../run-command.js';
import { ConfigInput } from '../config-input.js';
import { Progress, RunProgress } from '../progress.js';
import { loadJsonFile } from '../../io/load-json.js';

interface SolveFlags {
  chain?: string;
  f?: string;
  segmentRatio?: string;
  firstBlockShare?: string;
  chiN?: string;
  period?: string;
  periods?: string;
  nx?: string;
  ns?: string;
  tolerance?: string;
  start?: string;
  json?: boolean;
  out?: string;
  overwrite?: boolean;
  propagators?: boolean;
  quiet?: boolean;
  film?: string;
  affinity?: string;
  thicknessScan?: string;
}

/** Flags are applied on top of the config file (or of a symmetric diblock at χN = 15); messages name the flag or the file's key. */
export function buildSolveConfig(configPath: string | undefined, flags: SolveFlags): SolveConfig {
  const input = new ConfigInput('solve', configPath, { version: 2, kind: 'solve', system: { chain: { type: 'diblock', f: 0.5 }, chiN: 15 } });
  if (flags.chain !== undefined) {
    input.reset('system.chain');
    input.set('--chain', flags.chain);
  }
  input.number('--f', flags.f);
  input.number('--segment-ratio', flags.segmentRatio);
  input.number('--first-block-share', flags.firstBlockShare);
  const chain = input.get('system.chain') as Record<string, unknown> | undefined;
  if (chain && typeof chain === 'object' && chain.type === undefined) chain.type = 'diblock';
  // A two-block chain named by --chain without --f is the symmetric one (a config file must say f).
  if (!configPath && chain && chain.type !== 'homopolymer' && chain.type !== 'blocks' && chain.f === undefined) chain.f = 0.5;
  input.number('--chiN', flags.chiN);
  input.period('--period', flags.period);
  input.number('--periods', flags.periods);
  // A film: --film H (Rg) makes the cell a film; --affinity B,T sets the walls' affinities for A.
  if (flags.film !== undefined) {
    input.number('--film', flags.film);
    (input.get('cell') as Record<string, unknown>).kind = 'film';
  }
  if (flags.affinity !== undefined) {
    const parts = flags.affinity.split(',');
    if (parts.length !== 2) throw new InputError(`--affinity: got "${flags.affinity}"; expected two numbers BOTTOM,TOP (kT per chain, > 0 attracts A), e.g. 1,-0.5`);
    const [bottom, top] = parts.map((p) => parseDecimal('--affinity', p));
    for (const v of [bottom, top]) if (typeof v === 'string') throw new InputError(v);
    const walls = (input.get('cell.walls') as Record<string, unknown> | undefined) ?? {};
    input.set('--affinity', { ...walls, bottom: { affinity: bottom }, top: { affinity: top } });
  }
  input.number('--nx', flags.nx);
  input.number('--ns', flags.ns);
  input.number('--tolerance', flags.tolerance);
  if (flags.start !== undefined) input.set('--start', flags.start === 'rpa' ? { type: 'rpa' } : flags.start === 'cosine' ? { type: 'cosine' } : { type: 'file', path: flags.start });
  if (flags.propagators) input.set('--propagators', true);
  return input.parse(solveConfigSchema);
}

export function registerSolve(program: Command): void {
  program
    .command('solve')
    .description('spectral SCFT reference solve of a 1D lamellar cell (config file and/or flags; flags override the file)')
    .argument('[config]', 'solve config JSON (kind "solve")')
    .option('--chain <type>', 'chain architecture: diblock | triblock | homopolymer')
    .option('--f <f>', 'A fraction of the chain, > 0 and < 1')
    .option('--segment-ratio <r>', 'conformational asymmetry b_A/b_B (lengths in Rg of a chain of segment length b_B)')
    .option('--first-block-share <t>', 'triblock: share of A in the first A block, > 0 and < 1')
    .option('--chiN <x>', 'χN')
    .option('--period <L|equilibrium>', 'lamellar period in Rg, or "equilibrium" for the stress-free period')
    .option('--periods <n>', 'lamellar periods in the cell')
    .option('--film <H>', 'a film of thickness H (Rg) between two walls instead of a periodic cell')
    .option('--thickness-scan <from:to:points>', 'films: also F(H) over this range of thicknesses (Rg), its minima and the terrace prediction for the film\'s thickness')
    .option('--affinity <bottom,top>', "the film walls' affinities for A (kT per chain; > 0 attracts A, < 0 attracts B, 0 neutral)")
    .option('--nx <n>', 'grid points (power of two)')
    .option('--ns <n>', 'contour steps over the chain (even per block)')
    .option('--tolerance <t>', 'stop when max |w_out − w_in| < t (kT)')
    .option('--start <cosine|rpa|FILE>', 'initial fields: cosine guess, RPA mode, or a solution.json to warm-start from')
    .option('--propagators', 'also write q(x, s) and q†(x, s)')
    .option('--json', 'print the result summary as JSON on stdout')
    .option('--out <dir>', 'write solution.json and profile.csv into this directory')
    .option('--overwrite', 'replace a previous solve output in --out (only the files mesofield wrote there)')
    .option('--quiet', 'no progress on stderr')
    .action(
      action(async (configPath: string | undefined, flags: SolveFlags) => {
        const config = buildSolveConfig(configPath, flags);
        const out = claimOut(flags, 'solve');
        return withOutput(out, () => solveCommand(config, configPath, flags, out));
      }),
    );
}

async function solveCommand(config: SolveConfig, configPath: string | undefined, flags: SolveFlags, out: OutputDirectory | undefined): Promise<void> {
  const t0 = performance.now();
  let initial;
  if (config.solver.start.type === 'file') {
    const file = loadJsonFile(config.solver.start.path, solutionFileSchema);
    initial = { A: Float64Array.from(file.grid.wA), B: Float64Array.from(file.grid.wB) };
  }
  const progress = new Progress('solve', flags.quiet);
  // The period search takes 4 to 7 evaluations (measured at f = 0.4, χN = 12, 20, 40); a
  // thickness scan then solves its points.
  const scanPoints = flags.thicknessScan !== undefined && config.cell.kind === 'film' ? parseScanRange('--thickness-scan', flags.thicknessScan).points : 0;
  const run = new RunProgress(progress, [
    { name: 'period search', units: config.cell.kind === 'periodic' && config.cell.period === 'equilibrium' ? 7 : 0, unit: 'evaluations', estimated: true },
    { name: 'thickness scan', units: scanPoints, unit: 'films' },
  ]);
  let ref;
  try {
    ref = solveFromConfig(config, {
      initial,
      onEvaluation: (e) => run.at('period search', e.evaluations, `L = ${e.period.toFixed(6)} Rg, F = ${e.freeEnergy.toFixed(9)} kT (${e.phase}), field residual ${e.residual.toExponential(2)} kT`),
    });
  } catch (e) {
    throw asInputError(e, configPath ?? 'flags');
  }
  const sol = ref.solution;
  let scan: FilmScanResult | undefined;
  if (flags.thicknessScan !== undefined) {
    if (config.cell.kind !== 'film') throw new InputError('--thickness-scan: only for a film (give --film H, or a config with cell.kind "film")');
    const range = parseScanRange('--thickness-scan', flags.thicknessScan);
    scan = runFilmScan({ system: config.system, walls: config.cell.walls, ...range, nx: config.cell.nx, ns: config.cell.ns, meanThickness: config.cell.thickness, options: config.solver, onPoint: (p, done, total) => run.at('thickness scan', done, `H = ${p.thickness.toPrecision(5)} Rg, F = ${p.freeEnergy.toPrecision(9)} kT (${p.layers || 'no layers'})`, done === total) });
  }
  progress.done(`${sol.phase}, ${ref.search ? `${ref.search.evaluations} period evaluations, ` : ''}${sol.iterations} iterations in the final solve, ${(ref.search?.seconds ?? sol.seconds).toFixed(3)} s`);
  let failedWhere = '';
  const summary = { ...summarize(sol, { periodTolerance: ref.search?.periodTolerance }), ...(ref.search ? { search: { evaluations: ref.search.evaluations, totalIterations: ref.search.totalIterations, seconds: ref.search.seconds } } : {}) };
  if (flags.out) {
    // runSeconds: the wall time of the whole solve (period search included), for the report's title page.
    const file = solutionToFile(sol, provenance(), config, {
      periodTolerance: ref.search?.periodTolerance,
      periodSearch: ref.search?.trace,
      ...(ref.film ? { film: { layers: ref.film.layers, freeEnergyPerArea: ref.film.freeEnergyPerArea } } : {}),
      // No disordered film distinct from the layered one (surface-induced ordering): null, not NaN.
      ...(scan ? { thicknessScan: { ...scan, points: scan.points.map((p) => ({ ...p, freeEnergyDisordered: Number.isFinite(p.freeEnergyDisordered) ? p.freeEnergyDisordered : null })) } } : {}),
      runSeconds: (performance.now() - t0) / 1000,
    });
    const files: Record<string, string> = {
      'solution.json': solutionText(file),
      'profile.csv': solutionGridCsv(sol),
    };
    const prop = propagatorCsv(sol);
    if (prop) files['propagators.csv'] = prop;
    if (!sol.converged) failedWhere = writeFailedOutput(flags.out, 'solve', files);
    else {
      const written = out!.write(files);
      if (!flags.quiet) process.stderr.write(`solve: wrote ${written.join(', ')}\n`);
    }
  }
  if (ref.film) {
    const film = filmSummary(ref);
    process.stdout.write(flags.json ? `${JSON.stringify(scan ? { ...film, thicknessScan: scan } : film, null, 2)}\n` : `${[...filmSummaryText(film, summary.chain, summary.chiN), ...(scan ? filmScanText(scan) : [])].join('\n')}\n`);
  } else if (flags.json) process.stdout.write(`${JSON.stringify(summary, null, 2)}\n`);
  else process.stdout.write(`${solutionSummaryLines(summary).join('\n')}\n`);
  if (!sol.converged) throw new RunFailure(`solve did not converge: ${sol.notes.join('; ')}${failedWhere ? `; ${failedWhere}` : ''}`);
}

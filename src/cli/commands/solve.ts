/** `mesofield solve`: one spectral reference solve, from a config file and/or flags. */
import type { Command } from 'commander';
import { join } from 'node:path';
import { RunFailure, asInputError, parseOrThrow } from '../../io/errors.js';
import { solveConfigSchema } from '../../io/schemas/solve-config.js';
import type { SolveConfig } from '../../io/schemas/solve-config.js';
import { propagatorCsv, solutionFileSchema, solutionGridCsv, solutionText, solutionToFile, summarize } from '../../io/formats/solution.js';
import { solutionSummaryLines } from '../../io/solution-text.js';
import { writeDirectoryAtomic } from '../../io/atomic-write.js';
import { provenance } from '../../io/versions.js';
import { solveFromConfig } from '../../spectral/solve-from-config.js';
import { action, numberFlag } from '../run-command.js';
import { obj, readRawConfig } from '../raw-config.js';
import { Progress } from '../progress.js';
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
  propagators?: boolean;
  quiet?: boolean;
}

/** Flags are applied on top of the config file (or of an empty diblock config). */
export function buildSolveConfig(configPath: string | undefined, flags: SolveFlags): SolveConfig {
  const raw: Record<string, unknown> = configPath ? readRawConfig(configPath) : { version: 2, kind: 'solve', system: { chain: { type: 'diblock', f: 0.5 }, chiN: 15 } };
  const system = obj(raw, 'system');
  if (flags.chain !== undefined) {
    const chain: Record<string, unknown> = { type: flags.chain };
    system.chain = chain;
  }
  const chain = obj(system, 'chain');
  const f = numberFlag('--f', flags.f);
  if (f !== undefined) chain.f = f;
  const ratio = numberFlag('--segment-ratio', flags.segmentRatio);
  if (ratio !== undefined) chain.segmentRatio = ratio;
  const share = numberFlag('--first-block-share', flags.firstBlockShare);
  if (share !== undefined) chain.firstBlockShare = share;
  if (chain.type === undefined) chain.type = 'diblock';
  if (chain.type !== 'homopolymer' && chain.type !== 'blocks' && chain.f === undefined) chain.f = 0.5;
  const chiN = numberFlag('--chiN', flags.chiN);
  if (chiN !== undefined) system.chiN = chiN;
  const cell = obj(raw, 'cell');
  if (flags.period !== undefined) cell.period = flags.period === 'equilibrium' ? 'equilibrium' : numberFlag('--period', flags.period);
  const periods = numberFlag('--periods', flags.periods);
  if (periods !== undefined) cell.periods = periods;
  const nx = numberFlag('--nx', flags.nx);
  if (nx !== undefined) cell.nx = nx;
  const ns = numberFlag('--ns', flags.ns);
  if (ns !== undefined) cell.ns = ns;
  const solver = obj(raw, 'solver');
  const tol = numberFlag('--tolerance', flags.tolerance);
  if (tol !== undefined) solver.tolerance = tol;
  if (flags.start !== undefined) solver.start = flags.start === 'rpa' ? { type: 'rpa' } : flags.start === 'cosine' ? { type: 'cosine' } : { type: 'file', path: flags.start };
  if (flags.propagators) obj(raw, 'output').propagators = true;
  return parseOrThrow(solveConfigSchema, raw, configPath ?? 'flags');
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
    .option('--nx <n>', 'grid points (power of two)')
    .option('--ns <n>', 'contour steps over the chain (even per block)')
    .option('--tolerance <t>', 'stop when max |w_out − w_in| < t (kT)')
    .option('--start <cosine|rpa|FILE>', 'initial fields: cosine guess, RPA mode, or a solution.json to warm-start from')
    .option('--propagators', 'also write q(x, s) and q†(x, s)')
    .option('--json', 'print the result summary as JSON on stdout')
    .option('--out <dir>', 'write solution.json and profile.csv into this directory')
    .option('--quiet', 'no progress on stderr')
    .action(
      action(async (configPath: string | undefined, flags: SolveFlags) => {
        const config = buildSolveConfig(configPath, flags);
        let initial;
        if (config.solver.start.type === 'file') {
          const file = loadJsonFile(config.solver.start.path, solutionFileSchema);
          initial = { A: Float64Array.from(file.grid.wA), B: Float64Array.from(file.grid.wB) };
        }
        const progress = new Progress('solve', flags.quiet);
        let ref;
        try {
          ref = solveFromConfig(config, {
            initial,
            onEvaluation: (e) => progress.update(`period search: evaluation ${e.evaluations}, L = ${e.period.toFixed(6)} Rg, F = ${e.freeEnergy.toFixed(9)} kT (${e.phase})`),
          });
        } catch (e) {
          throw asInputError(e, configPath ?? 'flags');
        }
        const sol = ref.solution;
        progress.done(`${sol.phase}, ${ref.search ? `${ref.search.evaluations} period evaluations, ` : ''}${sol.iterations} iterations in the final solve, ${(ref.search?.seconds ?? sol.seconds).toFixed(3)} s`);
        const summary = { ...summarize(sol, { periodTolerance: ref.search?.periodTolerance }), ...(ref.search ? { search: { evaluations: ref.search.evaluations, totalIterations: ref.search.totalIterations, seconds: ref.search.seconds } } : {}) };
        if (flags.out) {
          const file = solutionToFile(sol, provenance(), config, { periodTolerance: ref.search?.periodTolerance, periodSearch: ref.search?.trace });
          const files: Record<string, string> = {
            'solution.json': solutionText(file),
            'profile.csv': solutionGridCsv(sol),
          };
          const prop = propagatorCsv(sol);
          if (prop) files['propagators.csv'] = prop;
          writeDirectoryAtomic(flags.out, files);
          if (!flags.quiet) process.stderr.write(`solve: wrote ${Object.keys(files).map((n) => join(flags.out!, n)).join(', ')}\n`);
        }
        if (flags.json) process.stdout.write(`${JSON.stringify(summary, null, 2)}\n`);
        else process.stdout.write(`${solutionSummaryLines(summary).join('\n')}\n`);
        if (!sol.converged) throw new RunFailure(`solve did not converge: ${sol.notes.join('; ')}`);
      }),
    );
}

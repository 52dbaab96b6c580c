/** `mesofield solve`: one spectral reference solve, from a config file and/or flags. */
import type { Command } from 'commander';
import { InputError, RunFailure } from '../../io/errors.js';
import { solveConfigSchema } from '../../io/schemas/solve-config.js';
import type { SolveConfig } from '../../io/schemas/solve-config.js';
import { solutionFileSchema } from '../../io/formats/solution.js';
import type { OutputDirectory } from '../../io/output-directory.js';
import { solveOnWorker } from '../solve-on-worker.js';
import { claimOut, withOutput, writeFailedOutput } from '../run-output.js';
import { parseScanRange } from '../scan-range-flag.js';
import type { SolveRunOutput, SolveTask } from '../../spectral/solve-task.js';
import { installStopHandlers, RunStopped } from '../../runtime/stop.js';
import { parseDecimal } from '../decimal-text.js';
import { action } from '../run-command.js';
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

/**
 * The solve runs on a worker thread (spectral/solve-worker.ts) so that Ctrl-C or SIGTERM is
 * answered at once: the worker is ended, nothing is written (an output directory is left as
 * it was), and the exit is 130 or 143.
 */
async function solveCommand(config: SolveConfig, configPath: string | undefined, flags: SolveFlags, out: OutputDirectory | undefined): Promise<void> {
  let initial;
  if (config.solver.start.type === 'file') {
    const file = loadJsonFile(config.solver.start.path, solutionFileSchema);
    initial = { A: Float64Array.from(file.grid.wA), B: Float64Array.from(file.grid.wB) };
  }
  let thicknessScan;
  if (flags.thicknessScan !== undefined) {
    if (config.cell.kind !== 'film') throw new InputError('--thickness-scan: only for a film (give --film H, or a config with cell.kind "film")');
    thicknessScan = parseScanRange('--thickness-scan', flags.thicknessScan);
  }
  const progress = new Progress('solve', flags.quiet);
  const task: SolveTask = { config, source: configPath ?? 'flags', initial, thicknessScan, files: flags.out !== undefined, json: Boolean(flags.json) };
  const { solvePhases } = await import('../../spectral/solve-task.js');
  const run = new RunProgress(progress, solvePhases(task));
  const uninstall = installStopHandlers('solve', `stopping the solve; nothing will be written${flags.out ? ` (${flags.out} is left as it was)` : ''}`);
  let r: SolveRunOutput;
  try {
    r = await solveOnWorker(task, (s) => run.at(s.phase, s.done, s.detail, s.keep), () => new RunStopped(`solve stopped by a signal before it finished; nothing was written${flags.out ? ` (${flags.out} was left as it was)` : ''}`));
  } finally {
    uninstall();
  }
  progress.done(r.done);
  let failedWhere = '';
  if (flags.out && r.files) {
    if (!r.converged) failedWhere = writeFailedOutput(flags.out, 'solve', r.files);
    else {
      const written = out!.write(r.files);
      if (!flags.quiet) process.stderr.write(`solve: wrote ${written.join(', ')}\n`);
    }
  }
  process.stdout.write(r.stdout);
  if (!r.converged) throw new RunFailure(`solve did not converge: ${r.notes.join('; ')}${failedWhere ? `; ${failedWhere}` : ''}`);
}

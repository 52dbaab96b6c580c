/** `mesofield sweep`: a thin layer over src/sweep (run one shard of a grid, or merge shards). */
import type { Command } from 'commander';
import { basename, join } from 'node:path';
import { InputError, RunFailure } from '../../io/errors.js';
import { loadJsonFile } from '../../io/load-json.js';
import { sweepConfigSchema } from '../../io/schemas/sweep-config.js';
import type { SweepConfig } from '../../io/schemas/sweep-config.js';
import { thicknessScanLines } from '../../spectral/film-scan-run.js';
import { filmSweepScans } from '../../sweep/film-sweep.js';
import { mergeShards } from '../../sweep/merge.js';
import { runSweep } from '../../sweep/run-sweep.js';
import { formatIndices, parseShard } from '../../sweep/shard.js';
import type { SweepPointResult } from '../../sweep/solve-point.js';
import { tableFiles } from '../../sweep/sweep-file.js';
import { formatDuration, Progress } from '../progress.js';
import { action, workersFlag } from '../run-command.js';
import { claimOut, withOutput } from '../run-output.js';
import { installStopHandlers } from '../../runtime/stop.js';

interface SweepFlags {
  shard?: string;
  workers?: string;
  out?: string;
  overwrite?: boolean;
  merge?: string[];
  json?: boolean;
  quiet?: boolean;
}

const fixed = (v: number | null, digits: number) => (v === null ? '—' : v.toFixed(digits));

function tableText(points: SweepPointResult[], config: Pick<SweepConfig, 'cell'>): string {
  const film = points.some((p) => p.thickness !== undefined);
  const head = film
    ? ['index', 'χN', 'f', 'b_A/b_B', 'H/Rg', 'Λ_bottom', 'Λ_top', 'phase', 'layers', 'F/kT', 'F·H', 'F_dis/kT', 'iterations']
    : ['index', 'χN', 'f', 'b_A/b_B', 'phase', 'period/Rg', 'F/kT', 'F_dis/kT', 'iterations'];
  const rows = points.map((p) =>
    film
      ? [String(p.index), String(p.chiN), String(p.f), String(p.segmentRatio), String(p.thickness), String(p.affinityBottom), String(p.affinityTop), p.phase, p.layers || '—', fixed(p.freeEnergy, 10), fixed(p.freeEnergyPerArea ?? null, 8), fixed(p.freeEnergyDisordered, 6), String(p.totalIterations ?? '—')]
      : [String(p.index), String(p.chiN), String(p.f), String(p.segmentRatio), p.phase, fixed(p.period, 6), fixed(p.freeEnergy, 10), fixed(p.freeEnergyDisordered, 6), String(p.totalIterations ?? '—')],
  );
  const widths = head.map((h, c) => Math.max(h.length, ...rows.map((r) => r[c].length)));
  const table = `${[head, ...rows].map((r) => r.map((v, c) => v.padStart(widths[c])).join('  ')).join('\n')}\n`;
  // A film sweep over thickness: each F(H) with its minima, hull and terraces, as solve --thickness-scan prints them.
  const scans = filmSweepScans(config, points).map((sc) =>
    thicknessScanLines(sc, `F(H) at χN = ${sc.chiN}, f = ${sc.f}, b_A/b_B = ${sc.segmentRatio}, affinities ${sc.affinityBottom},${sc.affinityTop} (${sc.points.length} thicknesses):`).join('\n'),
  );
  return scans.length ? `${table}\n${scans.join('\n\n')}\n` : table;
}

function failure(failed: SweepPointResult[], total: number, file: string): RunFailure {
  return new RunFailure(`${failed.length} of ${total} sweep points failed (${formatIndices(failed.map((p) => p.index))}); their notes in ${file} say why`);
}

export function registerSweep(program: Command): void {
  program
    .command('sweep')
    .description('reference solves over a grid of χN, f and b_A/b_B (and a film\'s thickness and wall affinities): the whole grid, one shard of it (--shard), or a merge of shard outputs (--merge)')
    .argument('[config]', 'sweep config JSON (kind "sweep")')
    .option('--shard <I/N>', 'solve shard I of N (the points with index % N = I − 1), e.g. one per array job')
    .option('--workers <k>', 'worker threads solving points at once (default: min(2, cores))')
    .option('--out <dir>', 'output directory (default sweeps/<config name>); with --merge, where the merged table goes')
    .option('--merge <dirs...>', 'merge the shard files found in these directories into sweep.json and sweep.csv')
    .option('--json', 'print the table (or, for a shard, the shard file) as JSON on stdout')
    .option('--quiet', 'no progress on stderr')
    .action(
      action(async (configPath: string | undefined, flags: SweepFlags) => {
        const say = (m: string) => {
          if (!flags.quiet) process.stderr.write(`sweep: ${m}\n`);
        };
        if (flags.merge) {
          if (configPath !== undefined) throw new InputError(`config: got ${JSON.stringify(configPath)} with --merge; a merge takes the config from the shard files: leave it out`);
          if (flags.shard !== undefined || flags.workers !== undefined) throw new InputError('--merge: cannot be combined with --shard or --workers (a merge solves nothing)');
          if (flags.out === undefined) throw new InputError('--out: missing; --merge needs the directory to write sweep.json and sweep.csv into');
          // Into a new directory or a sweep output (a shard's folder): claimed like a sweep's, so a
          // folder of other files is refused and a concurrent writer is locked out.
          const claimed = claimOut({ out: flags.out, overwrite: flags.overwrite }, 'sweep', { continuePrevious: true });
          const shards = flags.merge;
          const { table, written } = await withOutput(claimed, () => {
            const table = mergeShards(shards);
            return { table, written: claimed!.write(tableFiles(table)) };
          });
          say(`merged ${table.shards.length} shard files (${table.totalPoints} points): wrote ${written.join(', ')}`);
          process.stdout.write(flags.json ? `${JSON.stringify(table, null, 2)}\n` : tableText(table.points, table.config));
          const failed = table.points.filter((p) => !p.converged);
          if (failed.length) throw failure(failed, table.totalPoints, written[1]);
          return;
        }
        if (configPath === undefined) throw new InputError('config: missing; give a sweep config file, or --merge DIR... --out DIR');
        const config = loadJsonFile(configPath, sweepConfigSchema);
        const shard = parseShard(flags.shard);
        const workers = workersFlag(flags.workers);
        const outDir = flags.out ?? join('sweeps', basename(configPath).replace(/(\.sweep)?\.json$/, ''));
        const progress = new Progress('sweep', flags.quiet);
        // A sweep's directory is continued, not replaced: solved points are kept and a rerun resumes.
        const claimed = claimOut({ out: outDir, overwrite: flags.overwrite }, 'sweep', { continuePrevious: true });
        const uninstall = installStopHandlers('sweep');
        const r = await withOutput(claimed, () => runSweep({
          config,
          outDir,
          shard,
          workers,
          log: say,
          onPoint: (p, s) => {
            const rate = s.solved / s.seconds;
            progress.update(
              `point ${s.done}/${s.total} (χN = ${p.chiN}, f = ${p.f}, b_A/b_B = ${p.segmentRatio}${p.thickness !== undefined ? `, H = ${p.thickness} Rg, affinities ${p.affinityBottom},${p.affinityTop}` : ''}): ${p.phase} | ${rate.toFixed(2)} points/s | ${formatDuration((s.total - s.done) / rate)} left`,
              s.done === s.total,
            );
          },
        })).finally(uninstall);
        if (r.status !== 'skipped') progress.done(`shard ${shard.index}/${shard.count}: ${r.shard.points.length} points on ${workers} worker${workers > 1 ? 's' : ''}; wrote ${r.written.join(', ')}`);
        const out = r.table ?? r.shard;
        process.stdout.write(flags.json ? `${JSON.stringify(out, null, 2)}\n` : tableText(out.points, config));
        if (r.failed.length) throw failure(r.failed, r.shard.points.length, r.shardFile);
      }),
    );
}

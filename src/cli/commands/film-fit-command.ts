/**
 * The film fit behind `invert --film` and `reflectivity DATA`: flags on top of a film-fit
 * config (or of an empty one) through its schema, the data file read, the fit run, the files
 * written. The library side is inverse/film/film-fit-run.ts.
 */
import { formatText } from '../../io/formats/file-format.js';
import { filmFitResultSchema } from '../../io/formats/film.js';
import { solutionText } from '../../io/formats/solution.js';
import { InputError, asInputError, parseOrThrow } from '../../io/errors.js';
import { readInputText } from '../../io/fs-errors.js';
import { filmFitConfigSchema } from '../../io/schemas/film-fit-config.js';
import type { FilmFitConfig } from '../../io/schemas/film-fit-config.js';
import { provenance } from '../../io/versions.js';
import { readFilmData, runFilmFit } from '../../inverse/film/film-fit-run.js';
import { Progress, RunProgress } from '../progress.js';
import { claimOut, withOutput } from '../run-output.js';
import { obj, readRawConfig } from '../raw-config.js';
import { numberFlag } from '../run-command.js';
import { numberList, sldFlag } from './film-flags.js';

export interface FilmFitFlags {
  f?: string;
  film?: string;
  thicknessStart?: string;
  affinity?: string;
  affinityRange?: string;
  chiNRange?: string;
  chiN?: string;
  rgNm?: string;
  sld?: string;
  dqOverQ?: string;
  background?: string;
  resolution?: string;
  wallRange?: string;
  nx?: string;
  ns?: string;
  intervals?: string;
  json?: boolean;
  out?: string;
  quiet?: boolean;
  report?: boolean;
  overwrite?: boolean;
}

export function buildFilmFitConfig(configPath: string | undefined, flags: FilmFitFlags): FilmFitConfig {
  const raw: Record<string, unknown> = configPath ? readRawConfig(configPath) : { version: 2, kind: 'film-fit', system: { chain: { type: 'diblock' } } };
  const chain = obj(obj(raw, 'system'), 'chain');
  if (chain.type === undefined) chain.type = 'diblock';
  const f = numberFlag('--f', flags.f);
  if (f !== undefined) chain.f = f;
  if (!configPath && f === undefined) throw new InputError('--f: missing; the A fraction f of the chain is required (or a CONFIG file with system.chain)');
  const cell = obj(raw, 'cell');
  if (flags.film !== undefined) cell.thickness = flags.film === 'fit' ? 'fit' : numberFlag('--film', flags.film);
  if (cell.thickness === undefined) throw new InputError('--film: missing; give the film thickness (in the units of the data: nm with --rg-nm, else Rg) or "fit"');
  const ts = numberFlag('--thickness-start', flags.thicknessStart);
  if (ts !== undefined) cell.thicknessStart = ts;
  const wr = numberFlag('--wall-range', flags.wallRange);
  if (wr !== undefined) obj(cell, 'walls').range = wr;
  for (const k of ['nx', 'ns'] as const) {
    const v = numberFlag(`--${k}`, flags[k]);
    if (v !== undefined) cell[k] = v;
  }
  const rg = numberFlag('--rg-nm', flags.rgNm);
  if (rg !== undefined) obj(raw, 'units').rgNm = rg;
  const inst = obj(raw, 'instrument');
  const sld = sldFlag(flags.sld);
  if (sld) inst.sld = sld;
  const dq = numberFlag('--dq-over-q', flags.dqOverQ);
  if (dq !== undefined) inst.dQoverQ = dq;
  const bg = numberFlag('--background', flags.background);
  if (bg !== undefined) inst.background = bg;
  const fit = obj(raw, 'fit');
  const cr = numberList('--chiN-range', flags.chiNRange, 2, '8,40');
  if (cr) fit.chiNRange = cr;
  const ar = numberList('--affinity-range', flags.affinityRange, 2, '-5,5');
  if (ar) fit.affinityRange = ar;
  const start = obj(fit, 'start');
  const aff = numberList('--affinity', flags.affinity, 2, '1,-0.5 (bottom, top)');
  if (aff) [start.bottom, start.top] = aff;
  const c0 = numberFlag('--chiN', flags.chiN);
  if (c0 !== undefined) start.chiN = c0;
  const w0 = numberFlag('--resolution', flags.resolution);
  if (w0 !== undefined) start.resolution = w0;
  if (flags.intervals !== undefined) fit.intervals = flags.intervals === 'none' ? [] : flags.intervals.split(',').map((s) => s.trim());
  return parseOrThrow(filmFitConfigSchema, raw, configPath ?? 'flags');
}

/** Read, fit, write; prints the summary (or JSON) on stdout. */
export async function runFilmFitCommand(command: string, dataPath: string, config: FilmFitConfig, flags: FilmFitFlags): Promise<number | void> {
  if (flags.report && !flags.out) throw new InputError('--report: needs --out DIR (the report is written into DIR/report)');
  const text = readInputText(dataPath);
  const data = readFilmData(text, dataPath, config.units.rgNm);
  if (command === 'reflectivity' && data.kind !== 'reflectivity') throw new InputError(`${dataPath}: the header is that of a depth profile (${data.kind}); reflectivity fits a Q,R,dR curve: fit depth profiles with invert --film`);
  const out = claimOut(flags, command);
  return withOutput(out, async (): Promise<number | void> => {
    const progress = new Progress(command, flags.quiet);
    // The fit's phases for the time left, each an expectation (the data decide their length;
    // measured on a 5 Rg film depth profile: 28 starts, 4 iterations, 57 profiled χN points).
    const plan = new RunProgress(progress, [
      { name: 'start', units: 28, unit: 'starts', estimated: true },
      { name: 'fit', units: 10, unit: 'iterations', estimated: true },
      ...config.fit.intervals.map((name) => ({ name: `interval ${name}`, units: 50, unit: 'points', estimated: true })),
    ]);
    const counts = new Map<string, number>();
    let run;
    try {
      run = runFilmFit(config, data, provenance(), (stage, detail, counted) => {
        if (counted) counts.set(stage, (counts.get(stage) ?? 0) + 1);
        plan.at(stage, counts.get(stage) ?? 0, detail);
      });
    } catch (e) {
      throw asInputError(e, 'flags');
    }
    progress.done(`χN = ${run.fit.params.chiN.toPrecision(5)} in ${run.fit.seconds.total.toFixed(1)} s`);
    if (out) {
      const written = out.write({ 'result.json': formatText(filmFitResultSchema, run.result), 'fit.csv': run.fitCsv, 'solution.json': solutionText(run.solution) });
      if (!flags.quiet) process.stderr.write(`${command}: wrote ${written.join(', ')}\n`);
    }
    process.stdout.write(flags.json ? `${JSON.stringify(run.result, null, 2)}\n` : run.summary);
    // A signal while the report is drawn stops it; the results stay (cli/report-after-run.ts).
    if (out && flags.report) return (await import('../report-after-run.js')).reportAfterRun(command, flags.out!, 'the results', flags.quiet);
  });
}

/**
 * A run directory → ReportInput. Reads what the directory holds:
 *  - solution files (kind "solution", as written by `mesofield solve --out`; any *.json):
 *    the one with solver "spectral" is the reference, one with solver "network" the
 *    network; an optional `periodSearch` trace in the reference gives F(L); a film's
 *    solution (cell.kind "film") gives the film pages, with F(H) when it holds a
 *    `thicknessScan`;
 *  - a training checkpoint (kind "checkpoint") and its metrics.json: the loss over every
 *    phase and the network's errors (readers/training-history.ts, readers/train-metrics.ts);
 *  - an inversion result (kind "inversion", readers/inversion-file.ts);
 *  - a sweep table (kind "sweep-table" or "sweep-shard", readers/sweep-file.ts);
 *  - a surrogate checkpoint (checkpoint.json of kind "surrogate-checkpoint"): the error map
 *    and the training rounds (surrogate-input.ts);
 *  - a measurement fit: fit-bragg's or fit-spacing's result (io/formats/measurement-fits.ts),
 *    fit-scattering's (io/formats/scattering-fit.ts); a bragg-pattern result with its
 *    pattern.csv (io/formats/bragg-pattern.ts).
 * The file formats are read in the readers/ files only. Anything missing or inconsistent is
 * an InputError naming the file and field.
 */
import { braggFitFileSchema, spacingFitFileSchema } from '../io/formats/measurement-fits.js';
import { scatteringResultSchema } from '../io/formats/scattering-fit.js';
import type { ScatteringResultFile } from '../io/formats/scattering-fit.js';
import { scatteringFitInput } from './scattering-fit-report.js';
import { braggPatternFileSchema, readBraggPatternCsv } from '../io/formats/bragg-pattern.js';
import { braggPatternInput } from './bragg-pattern-report.js';
import type { MeasurementFit } from './measurement-fit-input.js';
import { measurementFitInput } from './measurement-fit-input.js';
import { readdirSync, statSync } from 'node:fs';
import { filmFitResultSchema } from '../io/formats/film.js';
import type { FilmFitResultFile } from '../io/formats/film.js';
import { join } from 'node:path';
import { InputError, asInputError, parseOrThrow } from '../io/errors.js';
import { readJsonFile } from '../io/load-json.js';
import { solutionFileSchema } from '../io/formats/solution.js';
import { checkpointFileSchema } from '../io/formats/training.js';
import { inversionResultSchema } from '../io/formats/inversion.js';
import { shardFileSchema, sweepTableSchema } from '../io/formats/sweep.js';
import type { InversionResultFile } from '../io/formats/inversion.js';
import type { SolutionFile } from '../io/formats/solution.js';
import { buildChain } from '../physics/chain.js';
import { makeCell } from '../physics/cell/make-cell.js';
import { contourWithTotal } from '../physics/contour.js';
import type { ScftSolution } from '../physics/result.js';
import type { FilmInput, ReportInput, RunInfo } from './report-inputs.js';
import { surrogateInput } from './surrogate-input.js';
import { readInversion } from './readers/inversion-file.js';
import type { InversionRead } from './readers/inversion-file.js';
import { settingRows } from './readers/settings-rows.js';
import { readSweep } from './readers/sweep-file.js';
import { readTrainMetrics } from './readers/train-metrics.js';
import { trainingRecords } from './readers/training-history.js';
import { countLayers } from '../spectral/film-solve.js';
import { assertSameGrid } from './solution-differences.js';

/** A film-fit result (io/formats/film.ts) as the report draws it. */
function filmFitInput(f: FilmFitResultFile): ReportInput['filmFit'] {
  const c = f.curve;
  const kind = f.input.dataKind;
  const best = { chiN: f.chiN, bottom: f.affinity.bottom, top: f.affinity.top };
  const ivs: Partial<Record<string, { '95%': { lo: number; hi: number; deltaChi2: number } }>> = f.intervals;
  const unit: Record<string, string> = { chiN: '–', bottom: 'kT per chain × Rg', top: 'kT per chain × Rg' };
  const label: Record<string, string> = { chiN: 'χN', bottom: 'bottom-wall affinity', top: 'top-wall affinity' };
  return {
    dataKind: kind,
    xLabel: kind === 'reflectivity' ? 'Q (Å⁻¹)' : `depth (${c.xUnits})`,
    yLabel: kind === 'reflectivity' ? 'R (–)' : kind === 'sld' ? 'SLD (10⁻⁶ Å⁻²)' : 'φA (–)',
    data: c.x.map((x, i) => ({ x, value: c.y[i], sigma: c.sigma[i], fit: c.fit[i] })),
    parameters: (Object.keys(best) as (keyof typeof best)[]).map((k) => ({ name: label[k], value: best[k], lower: ivs[k]?.['95%'].lo, upper: ivs[k]?.['95%'].hi, unit: unit[k] })),
    profiles: Object.entries(f.profiles).map(([k, pts]) => ({ name: label[k] ?? k, points: pts ?? [], threshold: ivs[k]?.['95%'].deltaChi2 ?? 3.841 })),
    layers: f.layers,
    reducedChi2: f.reducedChi2,
    warnings: f.warnings,
  };
}


interface LoadedSolution {
  file: string;
  data: SolutionFile;
  solution: ScftSolution;
  trace?: SolutionFile['periodSearch'];
  provenance: SolutionFile['provenance'];
  film?: FilmInput;
  runSeconds?: number;
}

function loadSolution(path: string, raw: unknown): LoadedSolution {
  const data = parseOrThrow(solutionFileSchema, raw, path);
  const s = data.summary;
  let chain;
  let cell;
  try {
    chain = buildChain(data.system.chain);
    cell = makeCell(data.cell, `${path}: cell`);
  } catch (e) {
    throw asInputError(e, path);
  }
  const f64 = (a: number[]): Float64Array => Float64Array.from(a);
  const solution: ScftSolution = {
    solver: s.solver,
    system: data.system,
    cell,
    contour: contourWithTotal(chain, s.ns),
    length: s.length,
    periods: s.periods,
    period: s.period ?? Number.NaN,
    nx: s.nx,
    ns: s.ns,
    x: f64(data.grid.x),
    phi: { A: f64(data.grid.phiA), B: f64(data.grid.phiB) },
    w: { A: f64(data.grid.wA), B: f64(data.grid.wB) },
    Q: s.Q,
    QDagger: s.QDagger,
    freeEnergy: s.freeEnergy,
    freeEnergyDisordered: s.freeEnergyDisordered ?? Number.NaN,
    phase: s.phase,
    amplitude: s.amplitude,
    iterations: s.iterations,
    residual: s.residual,
    converged: s.converged,
    seconds: s.seconds,
    notes: s.notes,
    ...(data.propagators ? { propagators: { s: f64(data.propagators.s), q: data.propagators.q.map(f64), qDagger: data.propagators.qDagger.map(f64) } } : {}),
  };
  const walls = data.cell.kind === 'film' ? data.cell.walls : undefined;
  const film: FilmInput | undefined = walls
    ? {
        solution,
        thickness: s.length,
        walls: { bottom: walls.bottom.affinity, top: walls.top.affinity, range: walls.range },
        layers: data.film?.layers ?? countLayers(solution.phi),
        ...(data.film ? { freeEnergyPerArea: data.film.freeEnergyPerArea } : {}),
        ...(data.thicknessScan ? { scan: data.thicknessScan } : {}),
      }
    : undefined;
  return { file: path, data, solution, trace: data.periodSearch, provenance: data.provenance, film, runSeconds: data.runSeconds };
}

function pickOne(list: LoadedSolution[], solver: string, dir: string): LoadedSolution | undefined {
  if (list.length <= 1) return list[0];
  const named = list.find((l) => l.file.endsWith('/solution.json'));
  if (named) return named;
  throw new InputError(`${dir}: ${list.length} solution files from the ${solver} solver (${list.map((l) => l.file).join(', ')}); keep one per solver in a run directory`);
}

export interface LoadedRun {
  input: ReportInput;
  /** Files found and read, and files found but not read (said on stderr). */
  read: string[];
  notes: string[];
}

function checkDirectory(dir: string): void {
  let st;
  try {
    st = statSync(dir);
  } catch {
    throw new InputError(`${dir}: run directory not found; give the --out directory of a mesofield solve, train, evaluate, invert or sweep run`);
  }
  if (!st.isDirectory()) throw new InputError(`${dir}: not a directory; give the run directory (the --out directory of a run), not a file in it`);
}

const configKind = (config: unknown): string | undefined => {
  const k = (config as Record<string, unknown> | undefined)?.kind;
  return typeof k === 'string' ? k : undefined;
};

export function loadRun(dir: string, opts: { rgNm?: number } = {}): LoadedRun {
  checkDirectory(dir);
  const names = readdirSync(dir).filter((n) => n.endsWith('.json')).sort();
  const solutions: LoadedSolution[] = [];
  const read: string[] = [];
  const notes: string[] = [];
  let training: ReportInput['training'];
  let networkMetrics: ReportInput['networkMetrics'];
  let trainSeconds: { runSeconds?: number; runSecondsNote?: string } = {};
  let inv: InversionRead | undefined;
  let invConfig: unknown;
  let sweep: ReturnType<typeof readSweep> | undefined;
  let sweepProvenance: SolutionFile['provenance'] | undefined;
  let filmFit: ReportInput['filmFit'];
  let surrogate: ReportInput['surrogate'];
  let measurementFit: MeasurementFit | undefined;
  let scatteringFit: ScatteringResultFile | undefined;
  let braggPattern: ReportInput | undefined;
  for (const name of names) {
    const path = join(dir, name);
    const raw = readJsonFile(path);
    const kind = raw && typeof raw === 'object' ? (raw as Record<string, unknown>).kind : undefined;
    if (kind === 'solution') {
      solutions.push(loadSolution(path, raw));
    } else if (kind === 'inversion') {
      const file = parseOrThrow(inversionResultSchema, raw, path);
      inv = readInversion(file);
      invConfig = file.config;
      // The network estimator's χN trajectory (first seed), against the classical estimate.
      const ests = file.estimators;
      const traj = ests.network?.runs?.[0]?.trajectory?.filter((p): p is { step: number; chiN: number } => p.chiN !== null && Number.isFinite(p.chiN));
      if (traj && traj.length > 1 && !training) {
        const cl = ests.classical;
        training = { records: [], phases: [], wallClock: false, chiNTrajectory: traj, ...(cl ? { chiNReference: { value: cl.chiN, label: 'classical estimate' } } : {}) };
      }
      read.push(path);
    } else if (kind === 'film-fit-result') {
      filmFit = filmFitInput(parseOrThrow(filmFitResultSchema, raw, path));
      read.push(path);
    } else if (kind === 'bragg-fit') {
      measurementFit = { bragg: parseOrThrow(braggFitFileSchema, raw, path) };
    } else if (kind === 'spacing-fit') {
      measurementFit = { spacing: parseOrThrow(spacingFitFileSchema, raw, path) };
    } else if (kind === 'bragg-pattern') {
      // The drawn pattern is the pattern.csv written beside the result (io/formats/bragg-pattern.ts).
      braggPattern = braggPatternInput(dir, parseOrThrow(braggPatternFileSchema, raw, path), readBraggPatternCsv(join(dir, 'pattern.csv')));
    } else if (kind === 'fit-scattering-result') {
      scatteringFit = parseOrThrow(scatteringResultSchema, raw, path);
    } else if (kind === 'checkpoint') {
      // A training checkpoint (training/checkpoint.ts), read through its schema: its history is the training page.
      training = trainingRecords(parseOrThrow(checkpointFileSchema, raw, path).history);
    } else if (kind === 'sweep-table' || kind === 'sweep-shard') {
      // A merged table wins over its shards.
      if (!sweep || kind === 'sweep-table') {
        const file = kind === 'sweep-table' ? parseOrThrow(sweepTableSchema, raw, path) : parseOrThrow(shardFileSchema, raw, path);
        sweep = readSweep(file, path);
        sweepProvenance = file.provenance;
      }
    } else if (kind === 'surrogate-checkpoint') {
      surrogate = surrogateInput(raw, path);
    } else if (name === 'metrics.json' && (raw as { errors?: { phiA?: unknown } } | null)?.errors?.phiA !== undefined) {
      // A train run's metrics (a surrogate's metrics.json is read with its checkpoint).
      const m = readTrainMetrics(raw, path);
      networkMetrics = m.metrics;
      trainSeconds = { runSeconds: m.runSeconds, runSecondsNote: m.runSecondsNote };
    } else {
      notes.push(`${path}: not read (kind ${JSON.stringify(kind)} has no report section in this version)`);
      continue;
    }
    read.push(path);
  }
  if (solutions.length === 0 && braggPattern) return { input: braggPattern, read, notes };
  if (solutions.length === 0 && scatteringFit) return { input: scatteringFitInput(dir, scatteringFit), read, notes };
  if (solutions.length === 0 && measurementFit) return { input: measurementFitInput(dir, measurementFit), read, notes };
  if (solutions.length === 0 && sweep) return { input: sweepRun(dir, sweep, sweepProvenance!), read, notes };
  if (solutions.length === 0) {
    throw new InputError(`${dir}: no solution file found (a *.json with "kind": "solution", such as solution.json from mesofield solve --out) and no sweep table; files here: ${readdirSync(dir).sort().join(', ') || 'none'}`);
  }
  const reference = pickOne(solutions.filter((s) => s.solution.solver === 'spectral'), 'spectral', dir);
  const network = pickOne(solutions.filter((s) => s.solution.solver === 'network'), 'network', dir);
  const main = reference ?? network!;
  if (reference && network) {
    const a = JSON.stringify(reference.data.system);
    const b = JSON.stringify(network.data.system);
    if (a !== b) throw new InputError(`${network.file}: system ${b} differs from the reference's (${reference.file}: ${a}); a report compares solutions of one system`);
    assertSameGrid(reference.solution, network.solution, `${network.file} against ${reference.file}`);
  }
  // Without a spectral reference a network solution is shown alone, as "reference" curves.
  const shown = reference ?? network!;
  const kind = configKind(main.data.config) ?? (network ? 'evaluate' : 'solve');
  const config = inv ? invConfig : (network ?? main).data.config;
  const classicalOnly = inv !== undefined && !inv.estimatorNames.includes('network');
  const time = surrogate
    ? { runSeconds: surrogate.buildSeconds, runSecondsNote: 'building the surrogate: reference solves, fit and physics rounds' }
    : inv
      ? { runSeconds: inv.runSeconds, runSecondsNote: inv.runSecondsNote }
      : training || networkMetrics
        ? trainSeconds
        : main.runSeconds !== undefined
          ? { runSeconds: main.runSeconds }
          : { runSeconds: main.solution.seconds, runSecondsNote: main.trace ? `the final solve only; this run did not record the ${main.trace.length} period-search evaluations' time` : undefined };
  const info: RunInfo = {
    kind,
    source: dir,
    system: main.data.system,
    period: main.solution.period,
    rgNm: opts.rgNm ?? inv?.rgNm,
    settings: settingRows(config, (p) => classicalOnly && p === 'network'),
    provenance: (network ?? main).provenance,
    ...time,
  };
  // A film train run holds both: the film pages draw the network against the reference.
  const film = shown.film && reference && network ? { ...shown.film, network: network.solution } : shown.film;
  const input: ReportInput = {
    info,
    profiles: film ? undefined : { reference: shown.solution, network: reference ? network?.solution : undefined, ...(inv?.rgNm !== undefined ? { rgNm: inv.rgNm } : {}) },
    propagators: shown.solution.propagators ? { reference: shown.solution, network: reference && network?.solution.propagators ? network.solution : undefined } : undefined,
    training,
    networkMetrics,
    inversion: inv?.inversion,
    filmFit,
    surrogate,
    film,
    periodSearch: main.trace ? { trace: main.trace, period: main.solution.period, periodTolerance: main.data.summary.periodTolerance } : undefined,
  };
  if (!shown.solution.propagators && !film && !inv && !training) notes.push(`${shown.file}: no propagators stored (solve with --propagators to get the q(x, s) page)`);
  return { input, read, notes };
}

function sweepRun(dir: string, s: ReturnType<typeof readSweep>, provenance: SolutionFile['provenance']): ReportInput {
  return {
    info: { kind: 'sweep', source: dir, system: s.system, period: Number.NaN, settings: settingRows(s.config), provenance, runSeconds: s.solverSeconds, runSecondsNote: 'solver time summed over the points (points on several workers run at once)' },
    sweep: s.sweep,
  };
}

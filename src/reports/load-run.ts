/**
 * A run directory → ReportInput. Reads what the directory holds:
 *  - solution files (kind "solution", as written by `mesofield solve --out`; any *.json):
 *    the one with solver "spectral" is the reference, one with solver "network" the
 *    network; an optional `periodSearch` trace in the reference gives F(L);
 *  - metrics.json: every number, string or boolean in it becomes a metrics-table row;
 *  - a surrogate checkpoint (checkpoint.json of kind "surrogate-checkpoint"): the error map
 *    and the training rounds (surrogate-input.ts).
 * Anything missing or inconsistent is an InputError naming the file and field.
 */
import { readdirSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { InputError, asInputError, parseOrThrow } from '../io/errors.js';
import { readJsonFile } from '../io/load-json.js';
import { solutionFileSchema } from '../io/formats/solution.js';
import { checkpointFileSchema } from '../io/formats/training.js';
import { inversionResultSchema } from '../io/formats/inversion.js';
import type { InversionResultFile } from '../io/formats/inversion.js';
import type { SolutionFile } from '../io/formats/solution.js';
import { buildChain } from '../physics/chain.js';
import { makeCell } from '../physics/cell/make-cell.js';
import { contourWithTotal } from '../physics/contour.js';
import type { ScftSolution } from '../physics/result.js';
import type { MetricRow, ReportInput } from './report-inputs.js';
import { surrogateInput } from './surrogate-input.js';
import { assertSameGrid } from './solution-differences.js';

function inversionInput(file: InversionResultFile): ReportInput['inversion'] {
  const main = file.estimators.classical ?? Object.values(file.estimators)[0];
  if (!main?.points || !main.fitCurve) return undefined;
  const p = main.points;
  const threshold = main.intervals?.['68.3%']?.deltaChi2 ?? 1;
  return {
    quantity: 'φA',
    data: p.x.map((x, i) => ({ x, value: p.phiA[i], sigma: p.sigma[i] })),
    fitted: main.fitCurve.x.map((x, i) => ({ x, value: main.fitCurve!.phiA[i] })),
    residuals: p.x.map((x, i) => ({ x, normalized: p.residual[i] / p.sigma[i] })),
    profileLikelihood: (main.profileLikelihood ?? []).map((q) => ({ chiN: q.chiN, deltaChi2: q.deltaChi2 })),
    interval: { lower: main.interval[0], upper: main.interval[1], level: 0.683, threshold },
    bestChiN: main.chiN,
    estimators: Object.entries(file.estimators).map(([name, e]) => ({ name, chiN: e.chiN, lower: e.interval[0], upper: e.interval[1], note: e.intervalMethod.slice(0, 60) })),
  };
}

interface LoadedSolution {
  file: string;
  data: SolutionFile;
  solution: ScftSolution;
  trace?: SolutionFile['periodSearch'];
  provenance: SolutionFile['provenance'];
}

const readJson = readJsonFile;

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
  return { file: path, data, solution, trace: data.periodSearch, provenance: data.provenance };
}

/** Flatten a JSON object to "a.b.c: value" rows (numbers, strings, booleans; arrays are summarised). */
export function flattenRows(value: unknown, prefix: string, out: MetricRow[] = [], depth = 0): MetricRow[] {
  if (value === null || value === undefined) return out;
  if (typeof value === 'number') out.push({ name: prefix, value: String(value) });
  else if (typeof value === 'string' || typeof value === 'boolean') out.push({ name: prefix, value: String(value) });
  else if (Array.isArray(value)) out.push({ name: prefix, value: `[${value.length} values]` });
  else if (typeof value === 'object' && depth < 4) for (const [k, v] of Object.entries(value)) flattenRows(v, prefix ? `${prefix}.${k}` : k, out, depth + 1);
  return out;
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

export function loadRun(dir: string, opts: { rgNm?: number } = {}): LoadedRun {
  let st;
  try {
    st = statSync(dir);
  } catch {
    throw new InputError(`${dir}: run directory not found; give the --out directory of a mesofield solve, train, evaluate or invert run`);
  }
  if (!st.isDirectory()) throw new InputError(`${dir}: not a directory; give the run directory (the --out directory of a run), not a file in it`);
  const names = readdirSync(dir).filter((n) => n.endsWith('.json')).sort();
  const solutions: LoadedSolution[] = [];
  const read: string[] = [];
  const notes: string[] = [];
  let metrics: MetricRow[] | undefined;
  let training: ReportInput['training'];
  let trainingSeconds = Number.NaN;
  let inversion: ReportInput['inversion'];
  let surrogate: ReportInput['surrogate'];
  for (const name of names) {
    const path = join(dir, name);
    const raw = readJson(path);
    const kind = raw && typeof raw === 'object' ? (raw as Record<string, unknown>).kind : undefined;
    if (kind === 'solution') {
      solutions.push(loadSolution(path, raw));
      read.push(path);
    } else if (kind === 'inversion') {
      const inv = parseOrThrow(inversionResultSchema, raw, path);
      inversion = inversionInput(inv);
      // The network estimator's χN trajectory (first seed), against the classical estimate.
      const runs = inv.estimators.network?.runs;
      const traj = runs?.[0]?.trajectory?.filter((p): p is { step: number; chiN: number } => p.chiN !== null && Number.isFinite(p.chiN));
      if (traj && traj.length > 1 && !training) {
        const cl = inv.estimators.classical;
        training = { history: [], chiNTrajectory: traj, ...(cl ? { chiNReference: { value: cl.chiN, label: 'classical estimate' } } : {}) };
      }
      read.push(path);
    } else if (kind === 'checkpoint') {
      // A training checkpoint (training/checkpoint.ts): its loss history is the training page.
      const hist = parseOrThrow(checkpointFileSchema, raw, path).history.filter((h) => h.stage === 'adam');
      // Terms that are identically zero for this system (e.g. no field equations for a chain in a prescribed field) have no place on a log axis.
      const positive = (t: Record<string, number | undefined>) => Object.fromEntries(Object.entries(t).filter((e): e is [string, number] => e[1] !== undefined && e[1] > 0));
      training = { history: hist.map((h) => ({ step: h.step, terms: positive({ total: h.total, ...h.terms }), lr: h.learningRate })) };
      trainingSeconds = hist.length ? (hist[hist.length - 1] as { seconds?: number }).seconds ?? Number.NaN : Number.NaN;
      read.push(path);
    } else if (kind === 'surrogate-checkpoint') {
      surrogate = surrogateInput(raw, path);
      read.push(path);
    } else if (name === 'metrics.json') {
      metrics = flattenRows(raw, '').map((r) => ({ ...r, name: `metrics.json: ${r.name}` }));
      read.push(path);
    } else notes.push(`${path}: not read (kind ${JSON.stringify(kind)} has no report section in this version)`);
  }
  if (solutions.length === 0) {
    throw new InputError(`${dir}: no solution file found (a *.json with "kind": "solution", such as solution.json from mesofield solve --out); files here: ${readdirSync(dir).sort().join(', ') || 'none'}`);
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
  const input: ReportInput = {
    info: {
      kind: typeof (main.data.config as Record<string, unknown> | undefined)?.kind === 'string' ? String((main.data.config as Record<string, unknown>).kind) : network ? 'evaluate' : 'solve',
      source: dir,
      system: main.data.system,
      period: main.solution.period,
      rgNm: opts.rgNm,
      config: flattenRows(main.data.config, '').map((r) => `${r.name}: ${r.value}`),
      provenance: (network ?? main).provenance,
      runSeconds: surrogate ? surrogate.buildSeconds : training ? (training.history.length ? trainingSeconds : main.solution.seconds) : main.solution.seconds,
      runSecondsNote: surrogate ? 'building the surrogate: reference solves, fit and physics rounds' : training ? 'training, from the checkpoint history' : main.trace ? `final solve only; the ${main.trace.length} period-search evaluations took ${main.trace.reduce((a, t) => a + t.iterations, 0)} iterations in all` : undefined,
    },
    profiles: { reference: shown.solution, network: reference ? network?.solution : undefined },
    propagators: shown.solution.propagators ? { reference: shown.solution, network: reference && network?.solution.propagators ? network.solution : undefined } : undefined,
    training,
    inversion,
    surrogate,
    periodSearch: main.trace ? { trace: main.trace, period: main.solution.period, periodTolerance: main.data.summary.periodTolerance } : undefined,
    metrics,
  };
  if (!shown.solution.propagators) notes.push(`${shown.file}: no propagators stored (solve with --propagators to get the q(x, s) page)`);
  return { input, read, notes };
}

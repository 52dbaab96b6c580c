/**
 * One `solve` run as a library function: the spectral solve a config describes (period search
 * included), the optional film thickness scan, and everything the run prints or writes, as
 * text. It touches no file: the caller writes `files` (or, for a run that did not converge,
 * puts them beside the output) and prints `stdout`. Its input and output are plain data, so
 * the CLI runs it on a worker thread (spectral/solve-worker.ts) and stays free to answer a
 * Ctrl-C while it computes; tests call it directly.
 */
import { propagatorCsv, solutionGridCsv, solutionText, solutionToFile, summarize } from '../io/formats/solution.js';
import { solutionSummaryLines } from '../io/solution-text.js';
import { provenance } from '../io/versions.js';
import { asInputError } from '../io/errors.js';
import { filmSummary, filmSummaryText } from './film-summary.js';
import { filmScanText, runFilmScan } from './film-scan-run.js';
import type { FilmScanResult } from './film-scan-run.js';
import { solveFromConfig } from './solve-from-config.js';
import type { SolveRunOutput, SolveStep, SolveTask } from './solve-task.js';

export function solveRun(task: SolveTask, onStep: (step: SolveStep) => void = () => {}): SolveRunOutput {
  const t0 = performance.now();
  const { config } = task;
  let ref;
  try {
    ref = solveFromConfig(config, {
      initial: task.initial,
      onEvaluation: (e) => onStep({ phase: 'period search', done: e.evaluations, detail: `L = ${e.period.toFixed(6)} Rg, F = ${e.freeEnergy.toFixed(9)} kT (${e.phase}), field residual ${e.residual.toExponential(2)} kT` }),
    });
  } catch (e) {
    throw asInputError(e, task.source);
  }
  const sol = ref.solution;
  let scan: FilmScanResult | undefined;
  if (task.thicknessScan && config.cell.kind === 'film') {
    scan = runFilmScan({ system: config.system, walls: config.cell.walls, ...task.thicknessScan, nx: config.cell.nx, ns: config.cell.ns, meanThickness: config.cell.thickness, options: config.solver, onPoint: (p, done, total) => onStep({ phase: 'thickness scan', done, detail: `H = ${p.thickness.toPrecision(5)} Rg, F = ${p.freeEnergy.toPrecision(9)} kT (${p.layers || 'no layers'})`, keep: done === total }) });
  }
  const done = `${sol.phase}, ${ref.search ? `${ref.search.evaluations} period evaluations, ` : ''}${sol.iterations} iterations in the final solve, ${(ref.search?.seconds ?? sol.seconds).toFixed(3)} s`;
  const summary = { ...summarize(sol, { periodTolerance: ref.search?.periodTolerance }), ...(ref.search ? { search: { evaluations: ref.search.evaluations, totalIterations: ref.search.totalIterations, seconds: ref.search.seconds } } : {}) };
  let files: Record<string, string> | null = null;
  if (task.files) {
    // runSeconds: the wall time of the whole solve (period search included), for the report's title page.
    const file = solutionToFile(sol, provenance(), config, {
      periodTolerance: ref.search?.periodTolerance,
      periodSearch: ref.search?.trace,
      ...(ref.film ? { film: { layers: ref.film.layers, freeEnergyPerArea: ref.film.freeEnergyPerArea } } : {}),
      // No disordered film distinct from the layered one (surface-induced ordering): null, not NaN.
      ...(scan ? { thicknessScan: { ...scan, points: scan.points.map((p) => ({ ...p, freeEnergyDisordered: Number.isFinite(p.freeEnergyDisordered) ? p.freeEnergyDisordered : null })) } } : {}),
      runSeconds: (performance.now() - t0) / 1000,
    });
    files = { 'solution.json': solutionText(file), 'profile.csv': solutionGridCsv(sol) };
    const prop = propagatorCsv(sol);
    if (prop) files['propagators.csv'] = prop;
  }
  let stdout: string;
  if (ref.film) {
    const film = filmSummary(ref);
    stdout = task.json ? `${JSON.stringify(scan ? { ...film, thicknessScan: scan } : film, null, 2)}\n` : `${[...filmSummaryText(film, summary.chain, summary.chiN), ...(scan ? filmScanText(scan) : [])].join('\n')}\n`;
  } else if (task.json) stdout = `${JSON.stringify(summary, null, 2)}\n`;
  else stdout = `${solutionSummaryLines(summary).join('\n')}\n`;
  return { converged: sol.converged, notes: sol.notes, done, files, stdout };
}

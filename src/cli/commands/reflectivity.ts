/**
 * `mesofield reflectivity`: specular R(Q) of a film (solve it, build its SLD profile, Parratt),
 * or, given a measured Q,R,dR curve, fit χN and the wall affinities to it. Lengths (--film,
 * --resolution) are in nm here: Q is in Å⁻¹, so Rg in nm (--rg-nm) is always needed.
 */
import type { Command } from 'commander';
import { formatText, throughSchema } from '../../io/formats/file-format.js';
import { FILM_REFLECTIVITY_VERSION, filmReflectivitySchema } from '../../io/formats/film.js';
import { InputError } from '../../io/errors.js';
import { provenance } from '../../io/versions.js';
import { action, numberFlag, requiredFlag } from '../run-command.js';
import { claimOut, withOutput } from '../run-output.js';
import type { FilmReflectivitySettings } from '../../inverse/film/film-reflectivity.js';
import type { ReflectivityCurve } from '../../inverse/film/film-reflectivity-worker.js';
import type { FilmSolveStep } from '../../spectral/film-solve.js';
import type { FilmFitFlags } from './film-fit-command.js';
import { numberList, sldFlag } from './film-flags.js';

interface ReflectivityFlags extends FilmFitFlags {
  qRange?: string;
  points?: string;
}

async function computeCurve(flags: ReflectivityFlags): Promise<void> {
  const f = requiredFlag('--f', numberFlag('--f', flags.f), (v) => v > 0 && v < 1, 'the A fraction, 0 < f < 1');
  const chiN = requiredFlag('--chiN', numberFlag('--chiN', flags.chiN), (v) => v > 0 && v <= 200, 'a number in (0, 200]');
  const rgNm = requiredFlag('--rg-nm', numberFlag('--rg-nm', flags.rgNm), (v) => v > 0 && v < 1000, 'Rg in nm, a number > 0 (Q is in Å⁻¹, so lengths need nm)');
  const H = requiredFlag('--film', numberFlag('--film', flags.film), (v) => v > 0 && v / rgNm <= 500, 'the film thickness in nm, > 0');
  const [bottom, top] = numberList('--affinity', flags.affinity, 2, '1,-0.5 (bottom, top)') ?? [0, 0];
  const sld = sldFlag(flags.sld);
  if (!sld) throw new InputError('--sld: missing; give the SLDs of A, B, the substrate and the medium in 10⁻⁶ Å⁻² (e.g. 6.0,1.0,2.07,0)');
  const width = requiredFlag('--resolution', numberFlag('--resolution', flags.resolution ?? '0.5'), (v) => v >= 0 && v < H, 'the interface width in nm, ≥ 0 and below the thickness');
  const dq = requiredFlag('--dq-over-q', numberFlag('--dq-over-q', flags.dqOverQ ?? '0.05'), (v) => v >= 0 && v <= 0.5, 'the FWHM of the Q resolution relative to Q, in [0, 0.5]');
  const bg = requiredFlag('--background', numberFlag('--background', flags.background ?? '0'), (v) => v >= 0, 'a background ≥ 0');
  const [q0, q1] = numberList('--q-range', flags.qRange ?? '0.005,0.2', 2, '0.005,0.2 (Å⁻¹)')!;
  if (!(q0 > 0 && q1 > q0)) throw new InputError(`--q-range: got ${flags.qRange}; allowed: 0 < lo < hi, in Å⁻¹`);
  const points = requiredFlag('--points', numberFlag('--points', flags.points ?? '300'), (v) => Number.isInteger(v) && v >= 2 && v <= 100000, 'an integer from 2 to 100000');
  const nx = requiredFlag('--nx', numberFlag('--nx', flags.nx ?? '64'), (v) => Number.isInteger(v) && v >= 8 && (v & (v - 1)) === 0, 'a power of two ≥ 8');
  const ns = requiredFlag('--ns', numberFlag('--ns', flags.ns ?? '100'), (v) => Number.isInteger(v) && v >= 4, 'an integer ≥ 4');
  const wallRange = requiredFlag('--wall-range', numberFlag('--wall-range', flags.wallRange ?? '0.25'), (v) => v > 0 && v <= 5, 'the surface-field range in Rg, in (0, 5]');
  const q = Float64Array.from({ length: points }, (_, i) => q0 + ((q1 - q0) * i) / (points - 1));
  const out = claimOut(flags, 'reflectivity');
  await withOutput(out, () => writeCurve(flags, { f, chiN, rgNm, H, bottom, top, sld, width, dq, bg, q0, q1, points, nx, ns, wallRange, q }, out));
}

interface CurveSettings {
  f: number;
  chiN: number;
  rgNm: number;
  H: number;
  bottom: number;
  top: number;
  sld: { A: number; B: number; substrate: number; medium: number };
  width: number;
  dq: number;
  bg: number;
  q0: number;
  q1: number;
  points: number;
  nx: number;
  ns: number;
  wallRange: number;
  q: Float64Array;
}

async function writeCurve(flags: ReflectivityFlags, c: CurveSettings, out: ReturnType<typeof claimOut>): Promise<void> {
  const { f, chiN, rgNm, H, bottom, top, sld, width, dq, bg, q0, q1, points, nx, ns, wallRange, q } = c;
  const { SLD_UNIT } = await import('../../inverse/film/film-fit-run.js');
  const r = await curveOnWorker(
    { chain: { type: 'diblock', f, segmentRatio: 1 }, chiN, bottom, top, thickness: H / rgNm, width: width / rgNm, wallRange, rgNm, slds: { A: sld.A * SLD_UNIT, B: sld.B * SLD_UNIT, substrate: sld.substrate * SLD_UNIT, medium: sld.medium * SLD_UNIT }, dQoverQ: dq, background: bg, q, nx, ns },
    flags,
  );
  const sol = r;
  // Built through its schema (io/formats/film.ts): printed and written exactly as result.json holds it.
  const result = throughSchema(filmReflectivitySchema, {
    kind: 'film-reflectivity',
    version: FILM_REFLECTIVITY_VERSION,
    provenance: provenance(),
    settings: { f, chiN, affinity: { bottom, top }, thicknessNm: H, thickness: H / rgNm, rgNm, resolutionNm: width, sld, sldUnits: '1e-6 Å⁻²', dQoverQ: dq, background: bg, qRange: [q0, q1], points, nx, ns, wallRange },
    phase: sol.phase,
    layers: r.layers,
    freeEnergy: sol.freeEnergy,
    converged: sol.converged,
    slices: r.slices,
    seconds: r.seconds,
  });
  const curve = ['Q,R,RQ4', ...Array.from(q, (v, i) => `${v},${r.R[i]},${r.R[i] * v ** 4}`)].join('\n') + '\n';
  const profile = ['z_nm,sld', ...Array.from(r.z, (v, i) => `${v},${r.sld[i] / SLD_UNIT}`)].join('\n') + '\n';
  if (out) {
    const written = out.write({ 'reflectivity.csv': curve, 'sld-profile.csv': profile, 'result.json': formatText(filmReflectivitySchema, result) });
    if (!flags.quiet) process.stderr.write(`reflectivity: wrote ${written.join(', ')}\n`);
  }
  if (flags.json) process.stdout.write(`${JSON.stringify(result, null, 2)}\n`);
  else if (!out) process.stdout.write(curve);
  else process.stdout.write(`film ${H} nm (${(H / rgNm).toPrecision(5)} Rg), χN = ${chiN}: layers ${result.layers}, F = ${sol.freeEnergy.toFixed(5)} kT per chain; R(Q) at ${points} points from ${q0} to ${q1} Å⁻¹ (dQ/Q ${dq} FWHM, ${r.slices} slices) in ${r.seconds.toFixed(1)} s\n`);
}

/**
 * The film solve and R(Q) on a worker thread (inverse/film/film-reflectivity-worker.ts): SIGINT/SIGTERM
 * end it at once, nothing written, 130/143; a model error is bad input (exit 2), named as flags.
 */
async function curveOnWorker(settings: FilmReflectivitySettings, flags: ReflectivityFlags): Promise<ReflectivityCurve> {
  const { runInWorkers, PoolStopped } = await import('../../threads/worker-pool.js');
  const { errorFromWorker } = await import('../worker-errors.js');
  const { installStopHandlers, stopAbortSignal, RunStopped } = await import('../../runtime/stop.js');
  const kept = flags.out ? ` (${flags.out} is left as it was)` : '';
  const uninstall = installStopHandlers('reflectivity', `stopping the film solve; nothing will be written${kept}`);
  // One line says what runs (seconds to minutes), then the film solve's progress: start, iteration, residual, rate, time left.
  if (!flags.quiet) process.stderr.write(`reflectivity: solving the film (χN = ${settings.chiN}, ${settings.nx} × ${settings.ns}), then R(Q) at ${settings.q.length} points; Ctrl-C stops it\n`);
  const { Progress } = await import('../progress.js');
  const { FilmSolveProgress } = await import('../film-solve-progress.js');
  const progress = new Progress('reflectivity', flags.quiet);
  const film = new FilmSolveProgress();
  try {
    const [r] = await runInWorkers<FilmReflectivitySettings, ReflectivityCurve, FilmSolveStep>([settings], {
      entry: 'inverse/film/film-reflectivity-worker.js',
      workerData: null,
      workers: 1,
      // The line is built at each step (its rate needs every report); Progress throttles what is printed.
      onProgress: (step) => progress.update(film.line(step)),
      toError: errorFromWorker,
      signal: stopAbortSignal(),
    });
    return r;
  } catch (e) {
    if (e instanceof PoolStopped) throw new RunStopped(`reflectivity stopped by a signal during the film solve; nothing was written${flags.out ? ` (${flags.out} was left as it was)` : ''}`);
    throw e;
  } finally {
    uninstall();
  }
}

export function registerReflectivity(program: Command): void {
  program
    .command('reflectivity')
    .description('specular reflectivity R(Q) of a film (Parratt recursion on its SLD profile), or with DATA (CSV Q,R,dR) a fit of χN and the wall affinities to it')
    .argument('[data]', 'measured reflectivity CSV with columns Q (Å⁻¹), R, dR')
    .argument('[config]', 'film-fit config JSON (kind "film-fit"), with DATA; flags override it')
    .option('--f <f>', 'A fraction of the diblock')
    .option('--chiN <x>', 'χN of the film (without DATA); the fit start with DATA')
    .option('--film <H|fit>', 'film thickness in nm, or "fit" (with DATA)')
    .option('--thickness-start <H>', 'starting thickness in nm when --film fit')
    .option('--affinity <b,t>', 'wall affinities for A, bottom (substrate) and top, kT per chain × Rg (with DATA: the fit start)')
    .option('--rg-nm <R>', 'Rg in nm (required)')
    .option('--sld <a,b,sub,med>', 'SLDs of A, B, the substrate and the medium above, 10⁻⁶ Å⁻²')
    .option('--resolution <W>', 'Gaussian interface width in nm (default 0.5; with DATA: the fit start)')
    .option('--dq-over-q <r>', 'Gaussian Q resolution, FWHM relative to Q (default 0.05 without DATA, 0 with DATA unless given)')
    .option('--background <b>', 'constant background added to R (default 0)')
    .option('--q-range <lo,hi>', 'Q range in Å⁻¹ (default 0.005,0.2; without DATA)')
    .option('--points <n>', 'Q points (default 300; without DATA)')
    .option('--chiN-range <lo,hi>', 'χN search range of the fit (default 5,60)')
    .option('--affinity-range <lo,hi>', 'affinity search range of the fit (default -5,5)')
    .option('--intervals <list>', 'parameters with profile-likelihood intervals: chiN (default), bottom, top (slow), comma-separated, or none')
    .option('--wall-range <l>', 'range of the walls\' surface field, Rg (default 0.25)')
    .option('--nx <n>', 'film grid points (default 64 for a curve, 32 for a fit)')
    .option('--ns <n>', 'contour steps (default 100 for a curve, 60 for a fit)')
    .option('--json', 'print the result JSON on stdout')
    .option('--out <dir>', 'write the result files into this directory')
    .option('--overwrite', 'replace a previous reflectivity output in --out (only the files mesofield wrote there)')
    .option('--quiet', 'no progress on stderr')
    .option('--report', 'with DATA: also write a PDF/PNG report into <out>/report (needs --out)')
    .action(
      action(async (dataPath: string | undefined, configPath: string | undefined, flags: ReflectivityFlags) => {
        if (!dataPath) return computeCurve(flags);
        if (flags.qRange !== undefined || flags.points !== undefined) throw new InputError(`${flags.qRange !== undefined ? '--q-range' : '--points'}: only without DATA (a fit uses the Q of the data)`);
        if (flags.rgNm === undefined && !configPath) throw new InputError('--rg-nm: missing; a reflectivity fit needs Rg in nm (Q is in Å⁻¹)');
        const { buildFilmFitConfig, runFilmFitCommand } = await import('./film-fit-command.js');
        const config = buildFilmFitConfig(configPath, flags);
        return runFilmFitCommand('reflectivity', dataPath, config, flags);
      }),
    );
}

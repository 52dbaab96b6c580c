/**
 * One surrogate training run from a surrogate config: anchor reference solves (equilibrium
 * periods) and the period model, held-out reference solves, optional extra fit data, the
 * field network's fit and physics rounds, the error map, the query timing, the checkpoint.
 * The CLI's `train` hands surrogate configs here; tests call surrogateRun directly.
 */
import { formatText } from '../io/formats/file-format.js';
import { SURROGATE_METRICS_VERSION, surrogateMetricsSchema } from '../io/formats/surrogate.js';
import type { SurrogateMetrics } from '../io/formats/surrogate.js';
import { RunFailure } from '../io/errors.js';
import { RunStopped, stopRequested, yieldToEvents } from '../runtime/stop.js';
import type { SurrogateConfig } from '../io/schemas/surrogate-config.js';
import { solutionToFile } from '../io/formats/solution.js';
import { provenance } from '../io/versions.js';
import { selectBackend } from '../autodiff/backend.js';
import { childSeed, Xorshift128 } from '../numerics/random.js';
import type { ScftSolution } from '../physics/result.js';
import { median } from '../numerics/median.js';
import { heldOutErrors, onReferenceCell, summarizeErrors } from './error-map.js';
import type { HeldOutError } from './error-map.js';
import { ParameterSpace } from './parameter-space.js';
import type { ParameterPoint } from './parameter-space.js';
import type { PeriodModel } from './period-model.js';
import { solveReference } from './reference-solves.js';
import { saveSurrogate } from './surrogate-checkpoint.js';
import type { SurrogateHistoryEntry } from './surrogate-checkpoint.js';
import { SurrogateModel } from './surrogate-model.js';
import { SurrogateTrainer } from './surrogate-training.js';
import { adaptivePoints } from './adaptive-points.js';
import type { ReferencePoint } from './surrogate-training.js';

export interface SurrogateRunOptions {
  config: SurrogateConfig;
  outDir?: string;
  backend?: SurrogateConfig['backend'];
  onStage?: (message: string) => void;
  onRound?: (r: SurrogateHistoryEntry & { rounds: number }) => void;
  /** Each reference solve (anchors, held-out points, extra fit points) as it finishes: `done` of `total`. */
  onSolve?: (done: number, total: number, role: string, seconds: number) => void;
  /** Each step of the fit to the reference solutions (Adam step, L-BFGS or Levenberg–Marquardt iteration) and its fit loss. */
  onFitStep?: (step: number, loss: number) => void;
}

export type { SurrogateMetrics } from '../io/formats/surrogate.js';

export interface SurrogateRunResult {
  metrics: SurrogateMetrics;
  model: SurrogateModel;
  anchors: ReferencePoint[];
  heldOut: ReferencePoint[];
  history: SurrogateHistoryEntry[];
  outDir?: string;
}

function timed<T>(f: () => T): [T, number] {
  const t0 = performance.now();
  const v = f();
  return [v, (performance.now() - t0) / 1000];
}

/** The anchor whose parameters are nearest to p (in normalised units): its fields start a fixed-period solve at p. */
function nearest(space: ParameterSpace, anchors: ReferencePoint[], p: ParameterPoint): ReferencePoint {
  const d = (a: ReferencePoint) => space.normalised(a.point).reduce((s, v, i) => s + (v - space.normalised(p)[i]) ** 2, 0);
  return anchors.reduce((best, a) => (d(a) < d(best) ? a : best));
}

/**
 * The reference solves one by one, with a stop (SIGINT/SIGTERM) answered between them: each
 * solve is synchronous (seconds), and a loop that never yields could not be interrupted.
 */
async function solvesBetweenStops<T>(points: ParameterPoint[], solve: (p: ParameterPoint) => T): Promise<T[]> {
  const out: T[] = [];
  for (const [i, p] of points.entries()) {
    await yieldToEvents();
    if (stopRequested()) throw new RunStopped(`surrogate training stopped by a signal after ${i} of ${points.length} reference solves of a stage; nothing was saved (a surrogate run is not resumable: run it again)`);
    out.push(solve(p));
  }
  return out;
}

async function timedAsync<T>(f: () => Promise<T>): Promise<[T, number]> {
  const t0 = performance.now();
  const r = await f();
  return [r, (performance.now() - t0) / 1000];
}

/** Train a surrogate; the caller disposes result.model. */
export async function surrogateRun(opts: SurrogateRunOptions): Promise<SurrogateRunResult> {
  const { config } = opts;
  const stage = opts.onStage ?? (() => {});
  const space = new ParameterSpace(config);
  const backendKind = opts.backend ?? config.backend;

  const anchorPoints = space.anchors();
  const heldPoints = space.heldOut(config.evaluation.random, config.evaluation.seed);
  const totalSolves = anchorPoints.length + heldPoints.length + config.warmStart.extraSolves + config.warmStart.adaptiveSolves;
  let solvesDone = 0;
  const solved = (role: string, seconds: number) => opts.onSolve?.(++solvesDone, totalSolves, role, seconds);
  stage(`reference solves at ${anchorPoints.length} anchors (equilibrium period)`);
  const anchorTimes: number[] = [];
  const [anchors, anchorSeconds] = await timedAsync(() =>
    solvesBetweenStops(anchorPoints, (p) => {
      const [solution, s] = timed(() => solveReference(space, config, p, { role: 'anchor' }));
      anchorTimes.push(s);
      solved('anchor', s);
      return { point: p, solution };
    }),
  );
  const periodModel: PeriodModel = { axes: space.axes.map((a) => ParameterSpace.axisValues(a)), periods: anchors.map((a) => a.solution.period) };

  stage(`reference solves at ${heldPoints.length} held-out points (equilibrium period)`);
  const [heldOut, heldOutSeconds] = await timedAsync(() =>
    solvesBetweenStops(heldPoints, (p) => {
      const [solution, s] = timed(() => solveReference(space, config, p, { role: 'held-out point' }));
      anchorTimes.push(s);
      solved('held-out point', s);
      return { point: p, solution };
    }),
  );

  const handle = await selectBackend(backendKind);
  const tf = handle.tf;
  const model = new SurrogateModel(tf, config, periodModel);
  try {
    const ws = config.warmStart;
    let extra: ReferencePoint[] = [];
    let extraSeconds = 0;
    if (ws.extraSolves > 0) {
      stage(`${ws.extraSolves} extra reference solves (fit data) at random points, period from the anchors`);
      const rng = new Xorshift128(childSeed(config.training.seed, 0x51));
      const extraPoints = Array.from({ length: ws.extraSolves }, () => space.draw(rng));
      [extra, extraSeconds] = await timedAsync(() =>
        solvesBetweenStops(extraPoints, (p) => {
          const [solution, s] = timed(() => solveReference(space, config, p, { period: model.period(p), initial: nearest(space, anchors, p).solution.w, role: 'extra fit point' }));
          solved('extra fit point', s);
          return { point: p, solution };
        }),
      );
    }

    const history: SurrogateHistoryEntry[] = [];
    const t0 = performance.now();
    const elapsed = () => (performance.now() - t0) / 1000;
    const evaluate = () => Math.max(...heldOutErrors(space, model.solutions(heldPoints), heldOut, anchors).map((e) => e.phiA.relativeL2));
    const trainer = new SurrogateTrainer(tf, model, config);
    stage(`fitting the field network to ${anchors.length + extra.length} reference solutions (${handle.backend} backend, tfjs ${handle.tfjsVersion})`);
    const fit = await trainer.fit([...anchors, ...extra], opts.onFitStep);
    let adaptive: SurrogateMetrics['timing']['adaptiveSolves'];
    if (ws.adaptiveSolves > 0) {
      // Adaptive sampling (adaptive-points.ts): reference solves where the fitted network's
      // SCFT residual is largest, then the fit continued on every reference solution.
      const picked = adaptivePoints(space, model, ws.adaptiveSolves, ws.adaptiveCandidates, childSeed(config.training.seed, 0xad));
      stage(`${picked.length} adaptive reference solves where the network's residual is largest (of ${ws.adaptiveCandidates} candidates; largest max|d|/χN ${picked[0]?.residual.toExponential(2)})`);
      const [added, addedSeconds] = await timedAsync(() =>
        solvesBetweenStops(
          picked.map((r) => r.point),
          (p) => {
            const [solution, s] = timed(() => solveReference(space, config, p, { period: model.period(p), initial: nearest(space, anchors, p).solution.w, role: 'adaptive fit point' }));
            solved('adaptive fit point', s);
            return { point: p, solution };
          },
        ),
      );
      extra = [...extra, ...added];
      stage(`continuing the fit on ${anchors.length + extra.length} reference solutions (${ws.adaptiveIterations} iterations)`);
      const t1 = performance.now();
      fit.finalLoss = await trainer.refit([...anchors, ...extra], ws.adaptiveIterations, opts.onFitStep);
      const refitSeconds = (performance.now() - t1) / 1000;
      fit.points = anchors.length + extra.length;
      adaptive = { count: added.length, seconds: addedSeconds, fitSeconds: refitSeconds, points: added.map((a) => a.point) };
    }
    const tr = config.training;
    const fitEntry = { round: 0, residual: null, fitLoss: fit.finalLoss, seconds: elapsed(), ...(tr.evaluateEvery > 0 ? { phiError: evaluate() } : {}) };
    history.push(fitEntry);
    opts.onRound?.({ ...fitEntry, rounds: tr.rounds });
    const roundsStart = performance.now();
    let lastResidual: number | null = null;
    for (let k = 1; k <= tr.rounds; k++) {
      // A signal lands between rounds (each is synchronous); a surrogate run is short and not resumable.
      await yieldToEvents();
      if (stopRequested()) throw new RunStopped(`surrogate training stopped by a signal after round ${k - 1} of ${tr.rounds}; nothing was saved (a surrogate run is not resumable: run it again)`);
      const r = await trainer.round(k, anchorPoints);
      lastResidual = r.residual;
      const evaluateNow = (tr.evaluateEvery > 0 && k % tr.evaluateEvery === 0) || k === tr.rounds;
      const entry = { round: k, residual: r.residual, fitLoss: r.fitLoss, seconds: elapsed(), ...(evaluateNow ? { phiError: evaluate() } : {}) };
      if (!Number.isFinite(r.residual) || !Number.isFinite(r.fitLoss)) throw new RunFailure(`training: round ${k} diverged (residual ${r.residual}, fit loss ${r.fitLoss}); try a smaller training.mixing`);
      history.push(entry);
      opts.onRound?.({ ...entry, rounds: tr.rounds });
    }
    const roundsSeconds = (performance.now() - roundsStart) / 1000;

    stage(`error map at ${heldPoints.length} held-out points`);
    const surrogate = model.solutions(heldPoints);
    const errors = heldOutErrors(space, surrogate, heldOut, anchors);
    // Query time after start-up: one point at a time, as `predict` answers.
    const queries = heldPoints.map((p) => timed(() => model.solutions([p]))[1]);
    const referenceSolveSeconds = median(anchorTimes);
    const querySeconds = median(queries);
    const buildSeconds = anchorSeconds + extraSeconds + fit.seconds + (adaptive ? adaptive.seconds + adaptive.fitSeconds : 0) + roundsSeconds;
    const metrics: SurrogateMetrics = {
      kind: 'surrogate-metrics',
    version: SURROGATE_METRICS_VERSION,
      backend: handle.backend,
      tfjs: handle.tfjsVersion,
      parameters: space.axes.map((a) => ({ ...a })),
      fixed: space.fixed,
      errors: summarizeErrors(errors),
      heldOut: errors,
      timing: {
        referenceSolveSeconds,
        querySeconds,
        speedup: referenceSolveSeconds / querySeconds,
        anchorSeconds,
        extraSolves: { count: extra.length - (adaptive?.count ?? 0), seconds: extraSeconds },
        ...(adaptive ? { adaptiveSolves: adaptive } : {}),
        fitSeconds: fit.seconds,
        roundsSeconds,
        buildSeconds,
        equivalentReferenceSolves: buildSeconds / referenceSolveSeconds,
        heldOutSeconds,
      },
      training: { fit, rounds: tr.rounds, lastResidual },
    };
    if (opts.outDir) {
      const prov = { ...provenance({ backend: handle.backend, tfjs: handle.tfjsVersion }), backend: handle.backend, tfjs: handle.tfjsVersion };
      const worst = errors.reduce((w, e, k) => (e.phiA.relativeL2 > errors[w].phiA.relativeL2 ? k : w), 0);
      const file = (sol: ScftSolution) => `${JSON.stringify(solutionToFile(sol, prov, config), null, 1)}\n`;
      await saveSurrogate(
        tf,
        opts.outDir,
        {
          provenance: prov,
          config,
          periodModel,
          anchors: anchors.map((a) => ({ point: a.point, period: a.solution.period, freeEnergy: a.solution.freeEnergy })),
          history,
          metrics,
        },
        model,
        {
          'metrics.json': formatText(surrogateMetricsSchema, metrics, 2),
          'reference.json': file(heldOut[worst].solution),
          'network.json': file(onReferenceCell(surrogate[worst], heldOut[worst].solution)),
        },
      );
    }
    return { metrics, model, anchors, heldOut, history, outDir: opts.outDir };
  } catch (e) {
    model.dispose();
    throw e;
  }
}

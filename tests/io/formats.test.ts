/**
 * Every file kind the tool writes (src/io/formats) round-trips through its one schema: what
 * the writer builds reads back equal, and a file of an older version is refused with a
 * message that says so. Files come from the real writers where a cheap run makes them (a
 * spectral solve, a one-point sweep shard); the network files, whose runs take minutes, are
 * built here from the same schemas' rules (format checks only, no physics asserted).
 */
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import type { z } from 'zod';
import { formatText, readFormat } from '../../src/io/formats/file-format.js';
import { INVERSION_VERSION, inversionResultSchema } from '../../src/io/formats/inversion.js';
import { FILM_FIT_RESULT_VERSION, FILM_REFLECTIVITY_VERSION, FILM_SYNTH_TRUTH_VERSION, filmFitResultSchema, filmReflectivitySchema, filmSynthTruthSchema } from '../../src/io/formats/film.js';
import { runCli } from '../../src/cli/run-cli.js';
import { solutionFileSchema, solutionText, solutionToFile, summarize } from '../../src/io/formats/solution.js';
import { PREDICTION_VERSION, SURROGATE_CHECKPOINT_VERSION, SURROGATE_METRICS_VERSION, predictionSchema, surrogateCheckpointSchema, surrogateMetricsSchema } from '../../src/io/formats/surrogate.js';
import { sweepTableSchema, shardFileSchema } from '../../src/io/formats/sweep.js';
import { SYNTH_TRUTH_VERSION, synthTruthSchema } from '../../src/io/formats/synth-truth.js';
import { CHECKPOINT_VERSION, LOSS_TERMS, TRAIN_METRICS_VERSION, checkpointFileSchema, trainMetricsFileSchema } from '../../src/io/formats/training.js';
import { surrogateConfigSchema } from '../../src/io/schemas/surrogate-config.js';
import { sweepConfigSchema } from '../../src/io/schemas/sweep-config.js';
import { trainConfigSchema } from '../../src/io/schemas/train-config.js';
import { provenance } from '../../src/io/versions.js';
import { BRAGG_PATTERN_VERSION, braggPatternFileSchema, braggPatternFiles } from '../../src/io/formats/bragg-pattern.js';
import { SCATTERING_FIT_VERSION, scatteringFitFiles, scatteringResultSchema } from '../../src/io/formats/scattering-fit.js';
import { scatteringConfigSchema } from '../../src/io/schemas/scattering-config.js';
import { BRAGG_FIT_VERSION, SPACING_FIT_VERSION, braggFitFileSchema, spacingFitFileSchema } from '../../src/io/formats/measurement-fits.js';
import { runBraggPattern } from '../../src/inverse/bragg/run-bragg-pattern.js';
import { runScatteringFit } from '../../src/inverse/scattering/run-scattering-fit.js';
import { scatteringCsv, syntheticScattering } from '../helpers/debye-scattering.js';
import { PeriodicCell } from '../../src/physics/cell/periodic-cell.js';
import { solveFixedCell } from '../../src/spectral/scft-solver.js';
import { mergeShards } from '../../src/sweep/merge.js';
import { runSweep } from '../../src/sweep/run-sweep.js';

const tmp = () => mkdtempSync(join(tmpdir(), 'mesofield-formats-'));
const netProvenance = { ...provenance(), backend: 'wasm', tfjs: '4.22.0' };

/** Write through the schema, read back through the same schema: equal. Then the same file one version older is refused, saying why. */
function roundTrip<S extends z.ZodType>(schema: S, value: z.input<S>, kind: string, version: number): void {
  const path = join(tmp(), `${kind}.json`);
  writeFileSync(path, formatText(schema, value));
  const back = readFormat(path, schema);
  expect(back).toEqual(JSON.parse(readFileSync(path, 'utf8')));
  const old = { ...JSON.parse(readFileSync(path, 'utf8')), version: version - 1 };
  writeFileSync(path, JSON.stringify(old));
  expect(() => readFormat(path, schema)).toThrow(new RegExp(`version: got ${version - 1}; this version of mesofield reads "${kind}" files of version ${version}; the file was written by another version`));
}

describe('file formats', () => {
  // A real spectral solution on a small grid (the writer under test is the format, not the solver).
  const sol = solveFixedCell({ system: { chain: { type: 'diblock', f: 0.5, segmentRatio: 1 }, chiN: 15 }, cell: new PeriodicCell(3.8, 16, 1), contour: 40, keepPropagators: true });
  const summary = summarize(sol);

  it('solution: the writer builds it through the schema; it reads back equal; old versions and stray keys are refused', () => {
    const file = solutionToFile(sol, provenance(), { version: 2, kind: 'solve' });
    const path = join(tmp(), 'solution.json');
    writeFileSync(path, solutionText(file));
    expect(readFormat(path, solutionFileSchema)).toEqual(file);
    expect(file.cell).toEqual({ kind: 'periodic', length: 3.8, n: 16, periods: 1 });
    roundTrip(solutionFileSchema, file, 'solution', 2);
    expect(() => solutionFileSchema.parse({ ...file, periodRg: 3.8 })).toThrow(/periodRg/);
  });

  it('films: synth --film truth, a film fit result and a reflectivity result, from the real writers (small grids)', async () => {
    const dir = tmp();
    const synth = await runCli(['synth', '--film', '4', '--f', '0.5', '--chiN', '15', '--points', '40', '--noise', '0.02', '--nx', '16', '--ns', '20', '--affinity', '1,-1', '--out', join(dir, 's'), '--quiet'], { capture: true });
    expect(synth.code, synth.stderr).toBe(0);
    const truth = readFormat(join(dir, 's', 'truth.json'), filmSynthTruthSchema);
    expect(truth.measurement).toBe('phi');
    roundTrip(filmSynthTruthSchema, truth, 'film-synth-truth', FILM_SYNTH_TRUTH_VERSION);
    const fit = await runCli(['invert', join(dir, 's', 'profile.csv'), '--film', '4', '--f', '0.5', '--nx', '16', '--ns', '20', '--intervals', 'none', '--out', join(dir, 'f'), '--quiet'], { capture: true });
    expect(fit.code, fit.stderr).toBe(0);
    const result = readFormat(join(dir, 'f', 'result.json'), filmFitResultSchema);
    expect(result.input.points).toBe(40);
    roundTrip(filmFitResultSchema, result, 'film-fit-result', FILM_FIT_RESULT_VERSION);
    expect(() => filmFitResultSchema.parse({ ...result, chiNGuess: 1 })).toThrow(/chiNGuess/);
    const refl = await runCli(['reflectivity', '--f', '0.5', '--chiN', '15', '--film', '20', '--rg-nm', '5', '--sld', '1.5,1.0,2.07,0', '--points', '30', '--nx', '16', '--ns', '20', '--out', join(dir, 'r'), '--quiet'], { capture: true });
    expect(refl.code, refl.stderr).toBe(0);
    roundTrip(filmReflectivitySchema, readFormat(join(dir, 'r', 'result.json'), filmReflectivitySchema), 'film-reflectivity', FILM_REFLECTIVITY_VERSION);
  }, 120_000);

  it('synth-truth sidecar', () => {
    roundTrip(
      synthTruthSchema,
      {
        kind: 'synth-truth',
        version: SYNTH_TRUTH_VERSION,
        provenance: provenance(),
        chain: { type: 'diblock', f: 0.5, segmentRatio: 1 },
        f: 0.5,
        chiN: 15,
        period: 3.8,
        periodMode: 'equilibrium',
        offset: 0.6,
        points: 48,
        periods: 2,
        noise: 0.02,
        seed: 4,
        resolution: 0,
        nx: 32,
        ns: 60,
        xUnits: 'Rg',
        freeEnergy: summary.freeEnergy,
        note: 'test',
      },
      'synth-truth',
      SYNTH_TRUTH_VERSION,
    );
  });

  it('sweep shard and table, from a real one-point sweep', async () => {
    const dir = tmp();
    const config = sweepConfigSchema.parse({ version: 2, kind: 'sweep', parameters: { chiN: [12] }, cell: { period: 3.8, nx: 16, ns: 40 } });
    await runSweep({ config, outDir: dir, workers: 1 });
    const shard = readFormat(join(dir, 'sweep.json'), sweepTableSchema);
    expect(shard.points[0].segmentRatio).toBe(1);
    roundTrip(sweepTableSchema, shard, 'sweep-table', 2);
    const table = mergeShards([dir]);
    expect(table.points).toEqual(shard.points);
    const shardFile = { kind: 'sweep-shard' as const, version: 2 as const, provenance: provenance(), configHash: table.configHash, config, shard: { index: 1, count: 1 }, totalPoints: 1, indices: [0], complete: true, points: table.points };
    roundTrip(shardFileSchema, shardFile, 'sweep-shard', 2);
  });

  const zeros = Object.fromEntries(LOSS_TERMS.map((k) => [k, 0])) as Record<(typeof LOSS_TERMS)[number], number>;
  const metrics = {
    backend: 'wasm',
    tfjs: '4.22.0',
    phase: 'lamellar',
    networkPhase: 'lamellar',
    verdict: { ok: true, aboveTarget: null, ordered: true, warnings: [], summary: 'ok' },
    collapsed: false,
    sharedPropagator: true,
    errors: { phiA: { relativeL2: 1e-3, maxError: 2e-3 }, exchangeField: { relativeL2: 1e-2, maxError: 0.1 }, QRelativeError: 1e-4, freeEnergyError: 1e-5 },
    freshResiduals: zeros,
    reference: summary,
    network: { ...summary, solver: 'network' as const },
    training: { stopReason: 'completed' as const, message: 'completed 10 Adam steps', adamSteps: 10, seconds: 1.5, warmStart: { adamSteps: 5, seconds: 0.5, finalLoss: 1e-3 } },
  };

  it('training metrics.json', () => {
    roundTrip(trainMetricsFileSchema, { kind: 'train-metrics', version: TRAIN_METRICS_VERSION, ...metrics }, 'train-metrics', TRAIN_METRICS_VERSION);
  });

  const checkpoint = {
    kind: 'checkpoint' as const,
    version: CHECKPOINT_VERSION,
    provenance: netProvenance,
    config: trainConfigSchema.parse({ version: 2, kind: 'train', system: { chain: { type: 'diblock', f: 0.5 }, chiN: 15 } }),
    length: 3.8,
    periods: 1,
    step: 10,
    stage: 'done' as const,
    lossWeights: zeros,
    history: [{ step: 10, stage: 'adam' as const, total: 1e-3, terms: { mde: 1e-3 }, learningRate: 1e-3, seconds: 1 }],
    metrics,
    extraPoints: null,
    fieldPin: { periods: 1, phase: 0.25 },
    weightSpecs: [{ name: 'field/w0', shape: [1, 8], dtype: 'float32' }],
    weightBytes: 32,
  };

  it('training checkpoint', () => {
    roundTrip(checkpointFileSchema, checkpoint, 'checkpoint', CHECKPOINT_VERSION);
  });

  it('a version-2 checkpoint (no lamella pin saved) reads as version 3 with no pin; version 1 is refused', () => {
    const path = join(tmp(), 'checkpoint.json');
    const { fieldPin: _dropped, ...v2 } = { ...JSON.parse(formatText(checkpointFileSchema, checkpoint)), version: 2 };
    writeFileSync(path, JSON.stringify(v2));
    const read = readFormat(path, checkpointFileSchema);
    expect(read.version).toBe(CHECKPOINT_VERSION);
    expect(read.fieldPin).toBeNull();
    expect(read.step).toBe(10);
    writeFileSync(path, JSON.stringify({ ...v2, version: 1 }));
    expect(() => readFormat(path, checkpointFileSchema)).toThrow(/version: got 1; this version of mesofield reads "checkpoint" files of version 3/);
  });

  const point = { chiN: 15, f: 0.5, segmentRatio: 1 };
  const stat = { max: 1e-3, mean: 5e-4 };
  const surrogateMetrics = surrogateMetricsSchema.parse({
    kind: 'surrogate-metrics',
    version: 1,
    backend: 'wasm',
    tfjs: '4.22.0',
    parameters: [{ name: 'chiN', min: 12, max: 20, anchors: 3 }],
    fixed: { f: 0.5, segmentRatio: 1 },
    errors: { points: 1, phiARelativeL2: stat, freeEnergyError: stat, QRelativeError: stat, periodRelativeError: stat, anchorInterpolationPhiA: stat },
    heldOut: [{ point, phiA: { relativeL2: 1e-3, maxError: 2e-3 }, exchangeFieldRelativeL2: 1e-2, freeEnergyError: 1e-4, QRelativeError: 1e-4, period: { surrogate: 3.8, reference: 3.8, relativeError: 0 }, anchorInterpolationPhiA: 1e-2 }],
    timing: { referenceSolveSeconds: 0.2, querySeconds: 0.01, speedup: 20, anchorSeconds: 1, extraSolves: { count: 0, seconds: 0 }, fitSeconds: 1, roundsSeconds: 1, buildSeconds: 3, equivalentReferenceSolves: 15, heldOutSeconds: 0.5 },
    training: { fit: { adamSteps: 10, lbfgsIterations: 10, points: 3, finalLoss: 1e-4, seconds: 1 }, rounds: 1, lastResidual: null },
  });

  it('surrogate checkpoint', () => {
    roundTrip(
      surrogateCheckpointSchema,
      {
        kind: 'surrogate-checkpoint',
        version: SURROGATE_CHECKPOINT_VERSION,
        provenance: netProvenance,
        config: surrogateConfigSchema.parse({ version: 2, kind: 'surrogate', parameters: { chiN: { min: 12, max: 20, anchors: 3 } } }),
        periodModel: { axes: [[12, 16, 20]], periods: [3.6, 3.8, 4.0] },
        anchors: [{ point, period: 3.8, freeEnergy: 3.9 }],
        history: [{ round: 0, residual: null, fitLoss: 1e-3, seconds: 1 }],
        metrics: surrogateMetrics,
        weightSpecs: [{ name: 'field/w0', shape: [1, 8], dtype: 'float32' }],
        weightBytes: 32,
      },
      'surrogate-checkpoint',
      SURROGATE_CHECKPOINT_VERSION,
    );
    roundTrip(surrogateMetricsSchema, surrogateMetrics, 'surrogate-metrics', SURROGATE_METRICS_VERSION);
  });

  it('prediction', () => {
    const xs = [0, 1.9];
    roundTrip(
      predictionSchema,
      {
        kind: 'prediction',
        version: PREDICTION_VERSION,
        checkpoint: 'ck',
        provenance: provenance(),
        trainedRange: [{ name: 'chiN', min: 12, max: 20 }],
        extrapolated: false,
        warnings: [],
        point,
        outside: [],
        phase: 'lamellar',
        period: 3.8,
        freeEnergy: 3.9,
        freeEnergyDisordered: 3.75,
        Q: 1.2,
        QDagger: 1.2,
        residual: 1e-3,
        incompressibilityMax: 1e-6,
        seconds: 0.01,
        x: xs,
        t: [0, 0.5],
        phiA: [0.9, 0.1],
        phiB: [0.1, 0.9],
        wA: [-1, 1],
        wB: [1, -1],
      },
      'prediction',
      PREDICTION_VERSION,
    );
  });

  it('inversion result: NaN numbers (a network has no χ²) are written as null and read back', () => {
    const interval = { lo: 14.9, hi: 15.1, probability: 0.683, deltaChi2: Number.NaN, limitedByRange: { lo: false, hi: false } };
    const block = {
      method: 'network',
      status: 'ok' as const,
      chiN: 15,
      interval: [14.9, 15.1] as [number, number],
      interval95: [14.8, 15.2] as [number, number],
      intervals: { '68.3%': interval, '95%': { ...interval, probability: 0.95 } },
      intervalMethod: 'seed spread',
      offset: 0.6,
      period: 3.8,
      periodMode: 'equilibrium' as const,
      chi2: Number.NaN,
      reducedChi2: Number.NaN,
      rss: 0.01,
      rmsResidual: 0.02,
      n: 48,
      p: 1,
      dof: 47,
      sigma: { source: 'estimated' as const, value: 0.02, floored: false },
      seconds: 3,
      backend: 'wasm',
    };
    const text = formatText(inversionResultSchema, {
      kind: 'inversion',
      version: INVERSION_VERSION,
      provenance: provenance(),
      input: { file: 'p.csv', n: 48, xRange: [0, 7.6], units: { x: 'Rg' }, sigmaColumn: false },
      config: { version: 2, kind: 'invert' },
      assumptions: ['mean-field SCFT'],
      estimators: { network: block },
      agreement: { present: ['network'], compared: false, note: 'one estimator ran' },
    });
    const back = inversionResultSchema.parse(JSON.parse(text));
    expect(back.estimators.network.chi2).toBeNull();
    expect(back.estimators.network.backend).toBe('wasm');
    roundTrip(inversionResultSchema, back, 'inversion', INVERSION_VERSION);
  });

  it('bragg-pattern: result.json, peaks.csv and pattern.csv from the real run (the solution above)', () => {
    const dir = tmp();
    const path = join(dir, 'solution.json');
    writeFileSync(path, solutionText(solutionToFile(sol, provenance(), { version: 2, kind: 'solve' })));
    const { result, curve } = runBraggPattern({ solution: path, orders: 3, lorentz: true }, provenance());
    const files = braggPatternFiles(result, curve);
    expect(Object.keys(files).sort()).toEqual(['pattern.csv', 'peaks.csv', 'result.json']);
    expect(files['peaks.csv'].split('\n')[0]).toBe('order,q,relative');
    writeFileSync(join(dir, 'result.json'), files['result.json']);
    expect(readFormat(join(dir, 'result.json'), braggPatternFileSchema)).toEqual(result);
    roundTrip(braggPatternFileSchema, result, 'bragg-pattern', BRAGG_PATTERN_VERSION);
    expect(() => braggPatternFileSchema.parse({ ...result, periodRg: 3.8 })).toThrow(/periodRg/);
  });

  it('fit-scattering: result.json and fit-<k>.csv from the real run (one synthetic curve)', () => {
    const dir = tmp();
    writeFileSync(join(dir, 'i.csv'), scatteringCsv(syntheticScattering({ f: 0.5, chiN: 8, rg: 6, K: 50, bg: 0.3, noise: 0.02, seed: 5, n: 40 })));
    const config = scatteringConfigSchema.parse({ version: 2, kind: 'fit-scattering', system: { chain: { type: 'diblock', f: 0.5 } }, files: [{ file: 'i.csv' }], profilePoints: 0 });
    const { result } = runScatteringFit(config, { baseDir: dir, rgSource: 'flags', provenance: provenance() });
    const files = scatteringFitFiles(result);
    expect(Object.keys(files).sort()).toEqual(['fit-1.csv', 'result.json']);
    expect(files['fit-1.csv'].split('\n').length).toBe(40 + 2);
    writeFileSync(join(dir, 'result.json'), files['result.json']);
    expect(readFormat(join(dir, 'result.json'), scatteringResultSchema)).toEqual(result);
    roundTrip(scatteringResultSchema, result, 'fit-scattering-result', SCATTERING_FIT_VERSION);
  });

  // fit-bragg and fit-spacing runs take tens of seconds (tests/inverse run them): here the files are built from the schemas' rules (format checks only).
  const flags = { lo: false, hi: false };
  it('bragg-fit', () => {
    roundTrip(
      braggFitFileSchema,
      {
        kind: 'bragg-fit',
        version: BRAGG_FIT_VERSION,
        provenance: provenance(),
        config: { version: 2, kind: 'fit-bragg' },
        file: 'peaks.csv',
        qUnit: 'per_nm',
        assumptions: ['test'],
        chiN: 18,
        intervals: { '68.3%': { lo: 17.9, hi: 18.1, limitedByRange: flags }, '95%': { lo: 17.8, hi: 18.2, limitedByRange: flags } },
        thresholds: { '68.3%': 1, '95%': 3.84 },
        periodNm: 20,
        periodNmSd: 0.1,
        period: 3.4,
        impliedRgNm: 5.9,
        K: 1000,
        chi2: 1.2,
        dof: 2,
        peaks: [{ order: 1, q: 0.31, I: 1000, dI: 30, relative: 1, model: 1000, normalisedResidual: 0 }],
        profile: [{ chiN: 18, deltaChi2: 0 }],
        rgTie: null,
        notes: [],
        evaluations: 40,
        seconds: 2,
      },
      'bragg-fit',
      BRAGG_FIT_VERSION,
    );
  });

  it('spacing-fit', () => {
    roundTrip(
      spacingFitFileSchema,
      {
        kind: 'spacing-fit',
        version: SPACING_FIT_VERSION,
        provenance: provenance(),
        config: { version: 2, kind: 'fit-spacing' },
        file: 'spacing.csv',
        assumptions: ['test'],
        chi: 0.1,
        b: 0.6,
        intervals: { '68.3%': { chi: [0.09, 0.11], b: [0.59, 0.61], limitedByRange: flags }, '95%': { chi: [0.08, 0.12], b: [0.58, 0.62], limitedByRange: flags } },
        thresholds: { '68.3%': 1, '95%': 3.84 },
        chi2: 1,
        dof: 1,
        sigma: { source: 'estimated', value: 0.2 },
        chiRange: [0.05, 0.3],
        points: [{ N: 200, D: 20, dD: null, chiN: 20, period: 4, model: 20 }],
        profile: [{ chi: 0.1, deltaChi2: 0 }],
        notes: [],
        evaluations: 20,
        seconds: 1,
      },
      'spacing-fit',
      SPACING_FIT_VERSION,
    );
  });
});

/**
 * Report inputs built from real spectral solutions, small enough to solve in well under a
 * second. The "network" here is a FIXTURE: the spectral reference at a slightly different
 * χN, relabelled — it only exercises the overlay and error plots, it is not a network.
 */
import type { HistoryEntry } from '../../src/io/formats/training.js';
import { solveFixedCell } from '../../src/spectral/scft-solver.js';
import { PeriodicCell } from '../../src/physics/cell/periodic-cell.js';
import type { ScftSolution } from '../../src/physics/result.js';
import type { InversionInput, ReportInput, RunInfo, TrainingInput } from '../../src/reports/report-inputs.js';
import { trainingRecords } from '../../src/reports/readers/training-history.js';

export const SYSTEM = { chain: { type: 'diblock' as const, f: 0.5, segmentRatio: 1 }, chiN: 15 };
export const LENGTH = 3.7;
export const NX = 32;
export const NS = 40;

export function solveAt(chiN: number, initial?: ScftSolution): ScftSolution {
  return solveFixedCell({ system: { ...SYSTEM, chiN }, cell: new PeriodicCell(LENGTH, NX, 1), contour: NS, keepPropagators: true, initial: initial?.w });
}

export function runInfo(kind: string): RunInfo {
  return {
    kind,
    source: `fixture-${kind}`,
    system: SYSTEM,
    period: LENGTH,
    rgNm: 4.5,
    settings: [
      { name: 'system.chiN', value: '15' },
      { name: 'cell.period', value: String(LENGTH) },
      { name: 'cell.nx', value: String(NX) },
      { name: 'cell.ns', value: String(NS) },
      { name: 'networks.field.hidden', value: '32, 32, 32' },
    ],
    provenance: { version: '0.0.0-fixture', node: 'v20.0.0', createdAt: '2024-05-06T07:08:09.000Z' },
    runSeconds: 1.25,
  };
}

export function solveInput(reference: ScftSolution): ReportInput {
  return {
    info: runInfo('solve'),
    profiles: { reference },
    propagators: { reference },
    periodSearch: {
      trace: [3.3, 3.5, 3.7, 3.9].map((period, i) => ({ period, freeEnergy: 3.43 + 0.02 * (period - 3.7) ** 2, phase: 'lamellar', iterations: 30 - i })),
      period: 3.7,
      periodTolerance: 1e-4,
    },
  };
}

export function networkInput(reference: ScftSolution, fixtureNetwork: ScftSolution): ReportInput {
  const net = { ...fixtureNetwork, solver: 'network' as const };
  return {
    info: { ...runInfo('evaluate'), provenance: { ...runInfo('evaluate').provenance, backend: 'wasm (fixture)', tfjs: '4.22.0' } },
    profiles: { reference, network: net, networkLabel: 'fixture χN 15.6' },
    propagators: { reference, network: net, networkLabel: 'fixture χN 15.6' },
    metrics: [{ name: 'fixture metric', value: '42', unit: 'kT' }],
  };
}

/**
 * A synthetic training history in the checkpoint's format (warm start 50 steps, Adam 100
 * steps, L-BFGS 80 iterations, exponential decays): it only drives the plots and the reader.
 */
export function checkpointHistoryFixture(): HistoryEntry[] {
  const h: HistoryEntry[] = [];
  for (let step = 1; step <= 50; step++) h.push({ stage: 'warm-start', step, total: 0.5 * Math.exp(-step / 20), terms: {}, learningRate: 0.01, seconds: 0.02 * step, wallSeconds: 0.3 + 0.02 * step });
  for (let step = 1; step <= 100; step++) h.push({ stage: 'adam', step, total: 2 * Math.exp(-step / 60), terms: {}, learningRate: 1e-3, seconds: 0.05 * step, wallSeconds: 1.3 + 0.05 * step, ...(step % 50 === 0 ? { phiError: 0.2 * Math.exp(-step / 80) } : {}) });
  for (let it = 1; it <= 80; it++) h.push({ stage: 'lbfgs', step: 100, total: 0.3 * Math.exp(-it / 20), terms: {}, learningRate: 0, seconds: 5 + 0.04 * it, wallSeconds: 6.3 + 0.04 * it, lbfgsIterations: it, ...(it % 40 === 0 ? { phiError: 0.05 * Math.exp(-it / 30) } : {}) });
  return h;
}

export function trainingFixture(): TrainingInput {
  const t = trainingRecords(checkpointHistoryFixture());
  const steps = Array.from({ length: 60 }, (_, i) => 10 * i);
  return { ...t, chiNTrajectory: steps.map((step) => ({ step, chiN: 15 + 3 * Math.exp(-step / 150) })), chiNReference: { value: 15, label: 'true χN' } };
}

/** Deterministic pseudo-random normals (LCG + Box–Muller): fixed fixture noise. */
function normals(n: number, seed: number): number[] {
  let s = seed >>> 0;
  const u = (): number => {
    s = (1664525 * s + 1013904223) >>> 0;
    return (s + 0.5) / 4294967296;
  };
  return Array.from({ length: n }, () => Math.sqrt(-2 * Math.log(u())) * Math.cos(2 * Math.PI * u()));
}

/**
 * Fixture inversion: "measured" φA = reference at χN 15 plus σ = 0.02 noise at every other
 * grid point; χ²(χN) from real solves on a χN grid; the interval where Δχ² < 1 (one
 * parameter, 68.3 %: Press et al., Numerical Recipes, 3rd ed., §15.6).
 */
export function inversionFixture(reference: ScftSolution, noiseScale = 1): InversionInput {
  const sigma = 0.02;
  const idx = Array.from({ length: NX / 2 }, (_, k) => 2 * k);
  const noise = normals(idx.length, 7);
  const data = idx.map((j, k) => ({ x: reference.x[j], value: reference.phi.A[j] + noiseScale * sigma * noise[k], sigma }));
  const grid = Array.from({ length: 11 }, (_, i) => 14 + 0.25 * i);
  const sols = grid.map((chiN) => solveAt(chiN, reference));
  const chi2 = sols.map((s) => idx.reduce((acc, j, k) => acc + ((data[k].value - s.phi.A[j]) / sigma) ** 2, 0));
  const min = Math.min(...chi2);
  const best = chi2.indexOf(min);
  const delta = chi2.map((c) => c - min);
  const cross = (from: number, dir: number): number => {
    for (let i = from; i + dir >= 0 && i + dir < grid.length; i += dir) {
      if (delta[i + dir] >= 1) return grid[i] + ((1 - delta[i]) / (delta[i + dir] - delta[i])) * (grid[i + dir] - grid[i]);
    }
    return grid[dir < 0 ? 0 : grid.length - 1];
  };
  const fit = sols[best];
  return {
    quantity: 'φA',
    data,
    fitted: Array.from(fit.x, (x, j) => ({ x, value: fit.phi.A[j] })),
    residuals: idx.map((j, k) => ({ x: reference.x[j], normalized: (data[k].value - fit.phi.A[j]) / sigma })),
    profileLikelihood: grid.map((chiN, i) => ({ chiN, deltaChi2: delta[i] })),
    interval: { lower: cross(best, -1), upper: cross(best, 1), level: 0.683, threshold: 1 },
    bestChiN: grid[best],
    estimators: [
      { name: 'profile-likelihood grid minimum', chiN: grid[best], lower: cross(best, -1), upper: cross(best, 1), note: 'fixture' },
      { name: 'true χN of the fixture data', chiN: 15, note: 'data made at this χN' },
    ],
  };
}

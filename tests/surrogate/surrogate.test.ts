/**
 * The parametric surrogate (issue 6) on χN ∈ [12, 20] at f = 0.5, trained briefly, checked
 * against the spectral reference (itself checked against Leibler's RPA, analytic propagators
 * and an independent finite-difference solver in tests/spectral) at held-out points.
 */
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { surrogateConfigSchema } from '../../src/io/schemas/surrogate-config.js';
import type { SurrogateConfigInput } from '../../src/io/schemas/surrogate-config.js';
import { InputError } from '../../src/io/errors.js';
import { selectBackend } from '../../src/autodiff/backend.js';
import { relL2 } from '../../src/physics/solution-metrics.js';
import { ParameterSpace } from '../../src/surrogate/parameter-space.js';
import { monotoneCubic } from '../../src/surrogate/period-model.js';
import { predictAt } from '../../src/surrogate/predict.js';
import { inConvention } from '../../src/physics/phase-convention.js';
import { PeriodicCell } from '../../src/physics/cell/periodic-cell.js';
import { loadSurrogate } from '../../src/surrogate/surrogate-checkpoint.js';
import { surrogateRun } from '../../src/surrogate/surrogate-run.js';
import type { SurrogateRunResult } from '../../src/surrogate/surrogate-run.js';

const cfg = (c: Omit<SurrogateConfigInput, 'version' | 'kind'>) => surrogateConfigSchema.parse({ version: 2, kind: 'surrogate', backend: 'wasm', ...c });

describe('monotone cubic period model', () => {
  it('reproduces linear data exactly and never overshoots monotone data', () => {
    // Fritsch & Butland (1984): the harmonic-mean slopes give a shape-preserving interpolant; linear data stay linear.
    const x = [12, 14, 16, 18, 20];
    for (const t of [12, 12.7, 15.3, 19.99, 20]) expect(monotoneCubic(x, x.map((v) => 2 * v + 1), t)).toBeCloseTo(2 * t + 1, 12);
    const step = [0, 0, 1, 1, 1];
    for (let t = 12; t <= 20; t += 0.05) {
      const v = monotoneCubic(x, step, t);
      expect(v).toBeGreaterThanOrEqual(-1e-15);
      expect(v).toBeLessThanOrEqual(1 + 1e-15);
    }
  });

  it('follows a smooth power law between five nodes to 1e-4', () => {
    // The period grows roughly as (χN)^{1/6} at strong segregation (Semenov, Sov. Phys. JETP 61, 733, 1985): a smooth law of that shape.
    const x = [12, 14, 16, 18, 20];
    const f = (v: number) => 1.1 * v ** (1 / 6);
    for (let t = 12; t <= 20; t += 0.25) expect(Math.abs(monotoneCubic(x, x.map(f), t) / f(t) - 1)).toBeLessThan(1e-4);
  });
});

describe('surrogate over χN ∈ [12, 20] at f = 0.5', () => {
  const dir = join(mkdtempSync(join(tmpdir(), 'mesofield-surrogate-')), 'ck');
  let run: SurrogateRunResult;
  const config = cfg({
    parameters: { chiN: { min: 12, max: 20, anchors: 5 } },
    // The spectral solves of the anchors, extra and held-out points were two thirds of this run's
    // CPU on 64 × 100; with 60 contour steps the run costs three quarters as much (measured), the
    // surrogate being checked against references on the same grid. Not 32 points: there the
    // prediction's F and the mean-field expression below differ by 1.7e-9 (measured), not < 5e-11.
    cell: { nx: 64, ns: 60 },
    networks: { field: { fourierModes: 4 } },
    warmStart: { extraSolves: 8, lbfgsIterations: 300 },
    training: { rounds: 2, fitIterations: 20, evaluateEvery: 0 },
    evaluation: { random: 1 },
  });

  beforeAll(async () => {
    run = await surrogateRun({ config, outDir: dir });
  });

  it('reaches φA relative L2 < 1e-2 and |F error| < 1e-2 kT at every held-out point', () => {
    // Measured here with this config (wasm): φA ≤ 4.9e-3, |F error| ≤ 1.2e-3 kT, period ≤ 3.1e-4 (on 64 × 100:
    // 4.8e-3, 1.1e-3 kT, 3.1e-4; with 500 L-BFGS iterations and 4 rounds there: φA ≤ 4.2e-3, |F error| ≤ 2.4e-3 kT);
    // the issue's target 1e-2 is the bound.
    const m = run.metrics;
    expect(m.heldOut.length).toBe(5);
    for (const e of m.heldOut) {
      expect(e.phiA.relativeL2, `χN = ${e.point.chiN}`).toBeLessThan(1e-2);
      expect(Math.abs(e.freeEnergyError), `χN = ${e.point.chiN}`).toBeLessThan(1e-2);
      // The period comes from the monotone cubic through the anchors: within 1e-3 of the equilibrium one.
      expect(Math.abs(e.period.relativeError)).toBeLessThan(1e-3);
    }
    // The held-out points are not the anchors (the centres of the anchor cells first).
    expect(m.heldOut.slice(0, 4).map((e) => e.point.chiN)).toEqual([13, 15, 17, 19]);
    expect(m.timing.speedup).toBeGreaterThan(1);
  });

  it('the anchors\' periods grow with χN with a local exponent falling towards 1/6 from above', () => {
    // Semenov's strong-segregation limit L ∝ (χN)^{1/6}, approached slowly from above by converged SCFT (Semenov 1985; common practice, no source, for the approach): a trend check only.
    const a = run.anchors.map((r) => ({ chiN: r.point.chiN, L: r.solution.period }));
    const exps = a.slice(1).map((r, i) => Math.log(r.L / a[i].L) / Math.log(r.chiN / a[i].chiN));
    for (let i = 0; i < exps.length; i++) {
      expect(exps[i]).toBeGreaterThan(1 / 6);
      expect(exps[i]).toBeLessThan(0.5);
      if (i > 0) expect(exps[i]).toBeLessThan(exps[i - 1]);
    }
  });

  it('predictions are continuous in χN: small changes give proportionally small changes, no jumps', () => {
    const model = run.model;
    const phi = (chiN: number) => predictAt(model, { chiN, f: 0.5, segmentRatio: 1 }).phiA;
    const base = phi(16.3);
    const d = [1e-3, 1e-2].map((h) => relL2(phi(16.3 + h), base));
    // Differentiable in χN: ten times the step, about ten times the change (common practice, no source).
    expect(d[1] / d[0]).toBeGreaterThan(5);
    expect(d[1] / d[0]).toBeLessThan(20);
    // Along a fine sweep the change per unit χN stays below twice the reference's own rate between neighbouring anchors.
    const ref = run.anchors;
    const refRate = Math.max(...ref.slice(1).map((r, i) => relL2(r.solution.phi.A, ref[i].solution.phi.A) / (r.point.chiN - ref[i].point.chiN)));
    let prev = phi(12);
    for (let chiN = 12.25; chiN <= 20; chiN += 0.25) {
      const cur = phi(chiN);
      expect(relL2(cur, prev) / 0.25, `χN = ${chiN}`).toBeLessThan(2 * refRate);
      prev = cur;
    }
  });

  it('a prediction is a consistent SCFT state: F = −ln Q + ⟨χN φAφB − wAφA − wBφB⟩, Q from q and q† agree, φA + φB ≈ 1', () => {
    // The SCFT free energy and Q = Q† (the standard mean-field expressions, common practice, no source), evaluated here independently of physics/scft-equations.ts.
    const p = predictAt(run.model, { chiN: 17.3, f: 0.5, segmentRatio: 1 });
    const n = p.phiA.length;
    let mean = 0;
    for (let j = 0; j < n; j++) mean += 17.3 * p.phiA[j] * p.phiB[j] - p.wA[j] * p.phiA[j] - p.wB[j] * p.phiB[j];
    expect(p.freeEnergy).toBeCloseTo(-Math.log(p.Q) + mean / n, 10);
    expect(Math.abs(p.QDagger / p.Q - 1)).toBeLessThan(1e-10);
    // Incompressibility is not built in: it holds only as far as the fields are self-consistent.
    for (let j = 0; j < n; j++) expect(Math.abs(p.phiA[j] + p.phiB[j] - 1)).toBeLessThan(1e-2);
    expect(p.phase).toBe('lamellar');
  });

  it('refuses points outside the trained range unless extrapolation is allowed', () => {
    expect(() => predictAt(run.model, { chiN: 20.5, f: 0.5, segmentRatio: 1 })).toThrow(/--chiN: got 20.5; the surrogate was trained for χN in \[12, 20\]/);
    expect(() => predictAt(run.model, { chiN: 15, f: 0.45, segmentRatio: 1 })).toThrow(/--f: got 0.45; the surrogate was trained at the fixed f = 0.5 only/);
    // A parameter the surrogate holds fixed has no network input: no answer exists there, even when extrapolation is allowed.
    expect(() => predictAt(run.model, { chiN: 15, f: 0.45, segmentRatio: 1 }, { allowExtrapolation: true })).toThrow(/--f: got 0.45; .*fixed f = 0.5 only[\s\S]*--allow-extrapolation does not apply/);
    expect(() => predictAt(run.model, { chiN: 15, f: 0.5, segmentRatio: 1.2 }, { allowExtrapolation: true })).toThrow(/--segment-ratio: got 1.2/);
    const p = predictAt(run.model, { chiN: 20.5, f: 0.5, segmentRatio: 1 }, { allowExtrapolation: true });
    expect(p.outside.length).toBe(1);
    // Checked like any answer: φA + φB = 1 (docs/physics.md: incompressibility) to the surrogate's limit, or a warning says it failed.
    expect(p.incompressibilityMax > 1e-3).toBe(p.warnings.some((w) => w.includes('φA + φB departs from 1')));
  });

  it('a saved checkpoint gives identical predictions when loaded', async () => {
    const { tf } = await selectBackend('wasm');
    const { file, model } = loadSurrogate(tf, dir);
    try {
      expect(file.provenance.backend).toBe('wasm');
      expect(file.config.parameters.chiN).toEqual({ min: 12, max: 20, anchors: 5 });
      for (const chiN of [12, 14.2, 19.9]) {
        const a = predictAt(run.model, { chiN, f: 0.5, segmentRatio: 1 }, { points: 50 });
        const b = predictAt(model, { chiN, f: 0.5, segmentRatio: 1 }, { points: 50 });
        expect(b.phiA).toEqual(a.phiA);
        expect(b.freeEnergy).toBe(a.freeEnergy);
        expect(b.period).toBe(a.period);
      }
    } finally {
      model.dispose();
    }
  });
});

describe('surrogate over χN and b_A/b_B (two parameters)', () => {
  it('trains, keeps the mean composition at f, and reports an error map over the anchor cells', async () => {
    const dir = join(mkdtempSync(join(tmpdir(), 'mesofield-surrogate-2d-')), 'ck');
    const config = cfg({
      parameters: { chiN: { min: 14, max: 18, anchors: 2 }, f: 0.4, segmentRatio: { min: 0.8, max: 1.2, anchors: 2 } },
      cell: { nx: 32, ns: 60 },
      warmStart: { extraSolves: 4, lbfgsIterations: 200 },
      training: { rounds: 1, pointsPerRound: 4, evaluateEvery: 0 },
      evaluation: { random: 0 },
    });
    const run = await surrogateRun({ config, outDir: dir });
    try {
      expect(run.metrics.heldOut.map((e) => [e.point.chiN, e.point.segmentRatio])).toEqual([[16, 1]]);
      // Measured here: 2.1e-3 at the one cell centre (4 anchors, 4 extra solves, 200 L-BFGS iterations; the anchors' interpolated profiles: 2.3e-2).
      expect(run.metrics.heldOut[0].phiA.relativeL2).toBeLessThan(1e-2);
      // ⟨φ_A⟩ = f: the A segments of every chain add up to the fraction f (exact, densities normalised by Q; common practice, no source).
      for (const ratio of [0.85, 1.13]) {
        const p = predictAt(run.model, { chiN: 15, f: 0.4, segmentRatio: ratio });
        expect(p.phiA.reduce((a, b) => a + b, 0) / p.phiA.length).toBeCloseTo(0.4, 6);
      }
      const { loadRun } = await import('../../src/reports/load-run.js');
      const { buildReport, figuresOf } = await import('../../src/reports/index.js');
      const ids = figuresOf(buildReport(loadRun(dir).input)).map((f) => f.id);
      expect(ids).toContain('surrogate-error-map');
      expect(ids).not.toContain('surrogate-error');
    } finally {
      run.model.dispose();
    }
  });
});

describe('surrogate set-up', () => {
  it('takes a range of f (each block has its own contour steps), and refuses an empty one', () => {
    expect(surrogateConfigSchema.safeParse({ version: 2, kind: 'surrogate', parameters: { chiN: { min: 12, max: 20 }, f: { min: 0.4, max: 0.5 } } }).success).toBe(true);
    const r = surrogateConfigSchema.safeParse({ version: 2, kind: 'surrogate', parameters: { chiN: { min: 12, max: 20 }, f: { min: 0.5, max: 0.4 } } });
    expect(r.success).toBe(false);
    expect(r.error!.issues[0].message).toMatch(/min < max/);
  });

  it('refuses a range whose anchors are disordered, naming the point', async () => {
    // Leibler (1980): the symmetric diblock orders only above χN = 10.495.
    const config = cfg({ parameters: { chiN: { min: 8, max: 12, anchors: 2 } }, cell: { nx: 32, ns: 40 } });
    await expect(surrogateRun({ config })).rejects.toThrow(InputError);
    await expect(surrogateRun({ config })).rejects.toThrow(/disordered at the anchor χN = 8/);
  });

  it('reference solutions are put in one phase: the A domain at x = 0', () => {
    const space = new ParameterSpace(cfg({ parameters: { chiN: { min: 12, max: 20 } } }));
    expect(space.cellCentres().map((p) => p.chiN)).toEqual([13, 15, 17, 19]);
    const nx = 8;
    const phiA = Float64Array.from({ length: nx }, (_, j) => 0.5 - 0.4 * Math.cos((2 * Math.PI * j) / nx));
    const cell = new PeriodicCell(3.7, nx, 1);
    const sol = { phi: { A: phiA, B: phiA.map((v) => 1 - v) }, w: { A: phiA.slice(), B: phiA.slice() } };
    const c = inConvention(cell, sol);
    expect(c.phi.A[0]).toBeCloseTo(0.9, 12);
    expect(inConvention(cell, c)).toBe(c);
  });
});

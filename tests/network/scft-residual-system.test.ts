import { describe, expect, it } from 'vitest';
import { trainConfigSchema } from '../../src/io/schemas/train-config.js';
import { selectBackend } from '../../src/autodiff/backend.js';
import { buildScftNetworks } from '../../src/network/scft-networks.js';
import { ScftProblem } from '../../src/network/problem/scft-problem.js';
import { ScftResidualSystem } from '../../src/network/least-squares/scft-residual-system.js';
import { buildChain } from '../../src/physics/chain.js';
import { groupJacobianEntry } from '../../src/numerics/grouped-normal-equations.js';
import type { ResidualGroup } from '../../src/numerics/grouped-normal-equations.js';

const unit = { mde: 1, periodicity: 1, initial: 1, incompressibility: 1, selfConsistency: 1, gauge: 1 };

/** Every residual of the groups as one vector (groups in order, rows in order). */
function residualVector(groups: ResidualGroup[]): Float64Array {
  return Float64Array.from(groups.flatMap((g) => Array.from(g.r)));
}

async function setup(chainSpec: object, chiN: number, withField: boolean, extra: object = {}) {
  const { tf } = await selectBackend('cpu');
  const config = trainConfigSchema.parse({
    version: 2,
    kind: 'train',
    system: { chain: chainSpec, chiN, ...extra },
    networks: { field: { hidden: [5] }, propagator: { hidden: [5, 4], fourierModes: 2 } },
    collocation: { nx: 8, nodesPerBlock: 4, random: 0 },
  });
  const chain = buildChain(config.system.chain);
  const nets = buildScftNetworks(tf, config, chain, 3.7, withField);
  // Move the parameters off Glorot's draw so every term is well away from 0.
  const x0 = nets.parameters.flatten().map((v, i) => v + 0.05 * Math.sin(1.7 * i));
  nets.parameters.unflatten(x0);
  return { tf, config, nets, x0: nets.parameters.flatten() };
}

describe('ScftResidualSystem (float64 residuals and Jacobian of the SCFT equations)', () => {
  for (const [label, spec, chiN] of [
    ['asymmetric diblock', { type: 'diblock', f: 0.4, segmentRatio: 1.3 }, 14],
    ['symmetric ABA triblock (one shared propagator network)', { type: 'triblock', f: 0.5 }, 18],
  ] as const) {
    it(`${label}: Jacobian columns match central differences of the residuals`, async () => {
      const { nets, config, x0 } = await setup(spec, chiN, true);
      const sys = new ScftResidualSystem(nets, config.system, { nx: 8, nodesPerBlock: 4 }, unit);
      const at = sys.evaluate(x0, true);
      const groups = at.groups!;
      // Central differences of the residual vector (common practice, no source).
      // The first columns of each propagator's first piece: the later blocks' rows reach them through the junction (factored columns).
      const probes = [0, 3, 40, sys.columnsOf('q').first, sys.columnsOf('q').first + 7, sys.columnsOf('qDagger').first + 2, Math.floor(x0.length / 2), x0.length - 30, x0.length - 1];
      for (const k of probes) {
        const h = 1e-6;
        const xp = Float64Array.from(x0);
        xp[k] += h;
        const xm = Float64Array.from(x0);
        xm[k] -= h;
        const rp = residualVector(sys.evaluate(xp, true).groups!);
        const rm = residualVector(sys.evaluate(xm, true).groups!);
        let row = 0;
        let worst = 0;
        let scale = 0;
        for (const g of groups) {
          for (let i = 0; i < g.r.length; i++, row++) {
            const fd = (rp[row] - rm[row]) / (2 * h);
            // The group's own J, or its factored columns' C·E.
            const an = groupJacobianEntry(g, i, k);
            worst = Math.max(worst, Math.abs(fd - an));
            scale = Math.max(scale, Math.abs(fd));
          }
        }
        expect(scale).toBeGreaterThan(0);
        expect(worst).toBeLessThan(1e-6 * Math.max(1, scale));
      }
      // ½ Σ r² of the groups is the cost the system reports.
      const r = residualVector(groups);
      expect(0.5 * r.reduce((s, v) => s + v * v, 0)).toBeCloseTo(at.cost, 12);
    });
  }

  it('field-equation terms equal the tfjs loss terms of ScftProblem (an independent float32 implementation)', async () => {
    const { tf, nets, config, x0 } = await setup({ type: 'diblock', f: 0.4 }, 14, true);
    const sys = new ScftResidualSystem(nets, config.system, { nx: 8, nodesPerBlock: 4 }, unit);
    const mine = sys.evaluate(x0, false).terms;
    const problem = new ScftProblem(tf, nets, config.system, config.collocation, 'detached');
    const theirs = tf.tidy(() => {
      const t = problem.terms();
      return { incompressibility: t.incompressibility.dataSync()[0], selfConsistency: t.selfConsistency.dataSync()[0], gauge: t.gauge.dataSync()[0] };
    });
    problem.dispose();
    for (const k of ['incompressibility', 'selfConsistency', 'gauge'] as const) {
      expect(mine[k]).toBeGreaterThan(1e-6);
      expect(Math.abs(mine[k] - theirs[k])).toBeLessThan(1e-4 * mine[k]);
    }
  });

  it("contour steps spread by the blocks' lengths: the field-equation terms (φ by Simpson's rule on those nodes) equal the tfjs ones on the same spread, and differ from the equal spread's", async () => {
    const { tf, nets } = await setup({ type: 'diblock', f: 0.35 }, 20, true);
    // Far off Glorot's draw: propagators that curve in s, so that the two spreads' quadratures differ.
    const x0 = nets.parameters.flatten().map((v, i) => v + 2 * Math.sin(1.7 * i));
    nets.parameters.unflatten(x0);
    const config = trainConfigSchema.parse({
      version: 2,
      kind: 'train',
      system: { chain: { type: 'diblock', f: 0.35 }, chiN: 20 },
      networks: { field: { hidden: [5] }, propagator: { hidden: [5, 4], fourierModes: 2 } },
      collocation: { nx: 8, nodesPerBlock: 4, random: 0, contourSpread: 'by-length' },
    });
    // 8 steps: 0.35 · 8 = 2.8 → 2 on A, 6 on B (equal: 4 and 4).
    const sys = new ScftResidualSystem(nets, config.system, { nx: 8, nodesPerBlock: 4, spread: 'by-length' }, unit);
    const mine = sys.evaluate(x0, false).terms;
    const equal = new ScftResidualSystem(nets, config.system, { nx: 8, nodesPerBlock: 4 }, unit).evaluate(x0, false).terms;
    const problem = new ScftProblem(tf, nets, config.system, config.collocation, 'detached');
    const theirs = tf.tidy(() => {
      const t = problem.terms();
      return { incompressibility: t.incompressibility.dataSync()[0], selfConsistency: t.selfConsistency.dataSync()[0] };
    });
    problem.dispose();
    for (const k of ['incompressibility', 'selfConsistency'] as const) {
      expect(mine[k]).toBeGreaterThan(1e-6);
      expect(Math.abs(mine[k] - theirs[k])).toBeLessThan(1e-4 * mine[k]);
      expect(Math.abs(mine[k] - equal[k])).toBeGreaterThan(1e-3 * mine[k]);
      expect(Math.abs(equal[k] - theirs[k])).toBeGreaterThan(1e-3 * mine[k]);
    }
  });

  it('one-block chain in an external field: the MDE term equals the tfjs one (same points: no junctions)', async () => {
    const ext = { externalField: { A: { type: 'cosine', amplitude: 2, mode: 1, offset: 0 } } };
    const { tf, nets, config, x0 } = await setup({ type: 'homopolymer', species: 'A' }, 0, false, ext);
    const sys = new ScftResidualSystem(nets, config.system, { nx: 8, nodesPerBlock: 4 }, unit);
    const mine = sys.evaluate(x0, false).terms;
    const problem = new ScftProblem(tf, nets, config.system, config.collocation, 'detached');
    const theirs = tf.tidy(() => problem.terms().mde.dataSync()[0]);
    problem.dispose();
    expect(mine.mde).toBeGreaterThan(1e-4);
    expect(Math.abs(mine.mde - theirs)).toBeLessThan(1e-4 * mine.mde);
  });

  it('value-only evaluations reuse a side only at the same parameters: after moving one propagator, the loss equals a fresh system\'s', async () => {
    const { nets, config, x0 } = await setup({ type: 'diblock', f: 0.4 }, 14, true);
    const sys = new ScftResidualSystem(nets, config.system, { nx: 8, nodesPerBlock: 4 }, unit);
    sys.evaluate(x0, false);
    const moved = Float64Array.from(x0);
    const { first } = sys.columnsOf('qDagger');
    moved[first + 3] += 0.1;
    sys.evaluate(moved, false, 'qDagger');
    const again = sys.evaluate(moved, false);
    const fresh = new ScftResidualSystem(nets, config.system, { nx: 8, nodesPerBlock: 4 }, unit).evaluate(moved, false);
    expect(again.cost).toBe(fresh.cost);
    expect(again.terms).toEqual(fresh.terms);
    // And back at the start point, the start's loss.
    expect(sys.evaluate(x0, false).cost).toBe(new ScftResidualSystem(nets, config.system, { nx: 8, nodesPerBlock: 4 }, unit).evaluate(x0, false).cost);
    expect(again.cost).not.toBe(sys.evaluate(x0, false).cost);
  });
  it('one propagator’s part: its gradient through the last Jacobian, and its output layer’s problem, equal the definitions', async () => {
    const { nets, config, x0 } = await setup({ type: 'diblock', f: 0.4 }, 14, true);
    const sys = new ScftResidualSystem(nets, config.system, { nx: 8, nodesPerBlock: 4 }, unit);
    for (const side of ['q', 'qDagger'] as const) {
      const { first, count } = sys.columnsOf(side);
      const problem = sys.partProblem(x0, side);
      const xs = x0.slice(first, first + count);
      const lin = problem.linearise(xs);
      if (lin.kind !== 'normal') throw new Error('expected normal equations');
      // At the linearisation point: Jᵀr itself.
      const g0 = problem.gradientWithLastJacobian!(xs);
      for (let a = 0; a < count; a++) expect(g0[a]).toBeCloseTo(lin.g[a], 12);
      // At a moved point: the old J (entries read by their definition) times the new residuals.
      const moved = Float64Array.from(xs, (v, i) => v + 0.01 * Math.cos(i));
      const oldGroups = sys.evaluate(x0, true, side).groups!;
      const full = Float64Array.from(x0);
      full.set(moved, first);
      const newR = sys.evaluate(full, true, side).groups!.map((g) => g.r);
      const g1 = problem.gradientWithLastJacobian!(moved);
      for (const a of [0, 5, Math.floor(count / 2), count - 1]) {
        let ga = 0;
        oldGroups.forEach((g, gi) => {
          for (let i = 0; i < g.r.length; i++) ga += groupJacobianEntry(g, i, first + a) * newR[gi][i];
        });
        expect(g1[a]).toBeCloseTo(ga, 12);
      }
      // The output layers' problem: the part's g and diagonal on those columns.
      const cols = sys.outputLayerColumns(side);
      expect(cols.length).toBe(nets[side === 'q' ? 'q' : 'qDagger'].pieces.length * 5);
      const sub = sys.columnProblem(x0, side, cols).linearise(Float64Array.from(cols, (c) => x0[c]));
      if (sub.kind !== 'normal') throw new Error('expected normal equations');
      cols.forEach((c, k) => {
        expect(sub.g[k]).toBeCloseTo(lin.g[c - first], 12);
        expect(sub.A[k * cols.length + k]).toBeCloseTo(lin.A[(c - first) * count + (c - first)], 12);
      });
    }
  });
});

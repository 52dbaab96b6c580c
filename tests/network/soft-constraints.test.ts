/**
 * Soft constraints of the propagator networks (networks.propagator.periodicity and
 * .initialCondition = 'soft'): the scaled x input and its derivative channels, the network
 * with a free first piece, the two loss terms, and their wiring in ScftProblem.
 *
 * Oracles: central finite differences of float64 re-implementations (reference64.ts); the
 * analytic linear response of a homopolymer in a weak cosine field (derived
 * below; first-order perturbation theory, common practice); hand evaluation of the loss formulas of losses/periodicity.ts and
 * losses/initial-condition.ts. float32 tolerances as in network.test.ts.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import type * as TfModule from '@tensorflow/tfjs';
import { propagatorNetworkSchema } from '../../src/io/schemas/network-schema.js';
import { trainConfigSchema } from '../../src/io/schemas/train-config.js';
import { selectBackend, type BackendName, type Tf } from '../../src/autodiff/backend.js';
import { propagatorFeatures } from '../../src/network/features.js';
import { Jet } from '../../src/autodiff/jet.js';
import { initialConditionLoss } from '../../src/network/losses/initial-condition.js';
import { periodicityLoss } from '../../src/network/losses/periodicity.js';
import { PropagatorNet } from '../../src/network/propagator-net.js';
import { buildScftNetworks } from '../../src/network/scft-networks.js';
import { ScftProblem } from '../../src/network/problem/scft-problem.js';
import { contourFromSteps } from '../../src/physics/contour.js';
import { PeriodicCell } from '../../src/physics/cell/periodic-cell.js';
import { buildChain } from '../../src/physics/chain.js';
import { expectClose } from '../helpers/expect-close.js';
import { fd, logQ64, readMlp } from './reference64.js';

const L = 3.2; // cell length in Rg
const F = 0.4; // junction of an A0.4-B0.6 diblock

/** A channel read out at full [rows, cols] size (broadcast rows expanded; null is zero). */
function full(tf: Tf, t: TfModule.Tensor | null, rows: number, cols: number): Float64Array {
  if (!t) return new Float64Array(rows * cols);
  return Float64Array.from(tf.tidy(() => tf.broadcastTo(t, [rows, cols])).dataSync());
}

describe.each(['cpu', 'wasm'] as BackendName[])('soft constraints on the %s backend', (kind) => {
  let tf: Tf;
  beforeAll(async () => {
    tf = (await selectBackend(kind)).tf;
  });

  it('scaled x input: values and ∂x, ∂xx, ∂s channels against finite differences', () => {
    const x = [-0.7, 0, 1.1, 2.5, L];
    const s = [0.45, 0.5, 0.62, 0.8, 1];
    const piece = { start: F, length: 1 - F };
    // float64 features of one point: [2x/L − 1, (s − F)/(1 − F)].
    const g = (xi: number, si: number) => [(2 * xi) / L - 1, (si - piece.start) / piece.length];
    tf.tidy(() => {
      const j = propagatorFeatures(tf, x, s, L, 3, piece, true, 'soft');
      expect(j.v.shape).toEqual([x.length, 2]);
      const ev: number[] = [];
      const edx: number[] = [];
      const edxx: number[] = [];
      const eds: number[] = [];
      x.forEach((xi, i) => {
        for (let c = 0; c < 2; c++) {
          ev.push(g(xi, s[i])[c]);
          const dx = fd((t) => g(t, s[i])[c], xi);
          edx.push(dx.d1);
          edxx.push(dx.d2);
          eds.push(fd((t) => g(xi, t)[c], s[i]).d1);
        }
      });
      expectClose(full(tf, j.v, x.length, 2), ev, 1e-6, 'ξ, σ');
      expectClose(full(tf, j.dx, x.length, 2), edx, 1e-5, '∂x');
      expectClose(full(tf, j.dxx, x.length, 2), edxx, 1e-5, '∂xx');
      expectClose(full(tf, j.ds, x.length, 2), eds, 1e-5, '∂s');
      // Value-only features carry no derivative channels.
      const v = propagatorFeatures(tf, x, s, L, 3, piece, false, 'soft');
      expect(v.dx).toBeNull();
      expectClose(full(tf, v.v, x.length, 2), ev, 1e-6, 'value-only');
    });
  });

  for (const [periodicity, initialCondition] of [
    ['soft', 'exact'],
    ['exact', 'soft'],
    ['soft', 'soft'],
  ] as const) {
    for (const pieces of ['single', 'per-block'] as const) {
      it(`propagator (periodicity ${periodicity}, initial condition ${initialCondition}, ${pieces}): u and every channel against the float64 forward pass`, () => {
        const cfg = propagatorNetworkSchema.parse({ hidden: [16, 16], fourierModes: 3, seed: 5, pieces, periodicity, initialCondition });
        const net = new PropagatorNet(tf, cfg, { period: L, blocks: [0, F, 1] });
        const named = net.parameters.namedWeights();
        const refPieces = net.pieces.map((_, k) => readMlp(named, `propagator/piece${k}`));
        const bounds = pieces === 'single' ? [0, 1] : [0, F, 1];
        const soft = { periodicity: periodicity === 'soft', initialCondition: initialCondition === 'soft' };
        const u64 = (xi: number, si: number) => logQ64(refPieces, bounds, 'tanh', L, 3, xi, si, undefined, soft)[0];
        // x over more than the cell, s away from 0, F and 1 by more than the FD steps, unsorted.
        let r = 17;
        const rnd = () => (r = (Math.imul(r, 1664525) + 1013904223) >>> 0) / 2 ** 32;
        const x = Array.from({ length: 40 }, () => -0.5 * L + 2 * L * rnd());
        const s = x.map(() => {
          const v = 0.01 + 0.98 * rnd();
          return Math.abs(v - F) < 0.01 ? v + 0.02 : v;
        });
        const pts = net.prepare(x, s);
        tf.tidy(() => {
          const u = net.logQ(pts);
          const n = x.length;
          const ev = x.map((xi, i) => u64(xi, s[i]));
          expectClose(full(tf, u.v, n, 1), ev, 2e-5, 'u');
          expectClose(full(tf, u.dx, n, 1), x.map((xi, i) => fd((t) => u64(t, s[i]), xi).d1), 2e-4, 'u ∂x');
          expectClose(full(tf, u.dxx, n, 1), x.map((xi, i) => fd((t) => u64(t, s[i]), xi).d2), 2e-4, 'u ∂xx');
          expectClose(full(tf, u.ds, n, 1), x.map((xi, i) => fd((t) => u64(xi, t), s[i]).d1), 2e-4, 'u ∂s');
        });
        pts.dispose();
        // What the soft forms give up: u(x, 0) = 0 (soft IC) and u(x + L) = u(x) (soft periodicity).
        const xg = Array.from({ length: 8 }, (_, i) => (i * L) / 8);
        const at = (xs: number[], sv: number) => {
          const p = net.prepare(xs, xs.map(() => sv), false);
          const v = tf.tidy(() => net.logQ(p).v).dataSync();
          p.dispose();
          return Float64Array.from(v);
        };
        const u0 = at(xg, 0);
        if (initialCondition === 'soft') expect(Math.max(...u0.map(Math.abs))).toBeGreaterThan(1e-3);
        else expect(u0.every((v) => v === 0)).toBe(true);
        const gap = Math.max(...Array.from(at(xg, 0.7), (v, i) => Math.abs(v - at(xg.map((t) => t + L), 0.7)[i])));
        if (periodicity === 'soft') expect(gap).toBeGreaterThan(1e-3);
        else expect(gap).toBeLessThan(1e-5);
        net.dispose();
      });
    }
  }

  it('soft initial condition: u stays continuous at the junction', () => {
    const cfg = propagatorNetworkSchema.parse({ hidden: [16, 16], seed: 9, initialCondition: 'soft', periodicity: 'soft' });
    const net = new PropagatorNet(tf, cfg, { period: L, blocks: [0, F, 1] });
    const xg = Array.from({ length: 12 }, (_, i) => (i * L) / 12);
    const d = 1e-3;
    const levels = [F - d, F, F + d];
    const pts = net.prepare(
      levels.flatMap(() => xg),
      levels.flatMap((sv) => xg.map(() => sv)),
    );
    tf.tidy(() => {
      const u = net.logQ(pts);
      const v = full(tf, u.v, 3 * xg.length, 1);
      const us = full(tf, u.ds, 3 * xg.length, 1);
      const nx = xg.length;
      // One-sided Taylor steps from both blocks reach the junction value (O(d²) = 1e-6 here).
      for (let i = 0; i < nx; i++) {
        expect(Math.abs(v[i] + d * us[i] - v[nx + i])).toBeLessThan(2e-5);
        expect(Math.abs(v[2 * nx + i] - d * us[2 * nx + i] - v[nx + i])).toBeLessThan(2e-5);
      }
    });
    pts.dispose();
    net.dispose();
  });

  it('both terms vanish on the analytic weak-field propagator and equal the hand formula elsewhere', () => {
    // Homopolymer, D = 1, in w(x) = ε cos(kx) (linear response, derived here): to first
    // order q = 1 + ε q₁ with ∂s q₁ = ∂xx q₁ − cos(kx), q₁(x, 0) = 0, so
    //   q₁ = −cos(kx)(1 − e^{−k²s})/k²,   u = ln q,   ∂x u = ∂x q / q.
    // The cell holds two wavelengths (k = 4π/L): q is L-periodic and q(x, 0) = 1 exactly.
    const eps = 0.05;
    const k = (4 * Math.PI) / L;
    const q = (x: number, s: number) => 1 - (eps * Math.cos(k * x) * (1 - Math.exp(-k * k * s))) / (k * k);
    const qx = (x: number, s: number) => (eps * k * Math.sin(k * x) * (1 - Math.exp(-k * k * s))) / (k * k);
    const sNodes = [0, 0.05, 0.2, 0.5, 1];
    const endJet = (xEnd: number) => {
      const xs = [...sNodes.map(() => 0), ...sNodes.map(() => xEnd)];
      const ss = [...sNodes, ...sNodes];
      const col = (f: (x: number, s: number) => number) => tf.tensor2d(xs.map((x, i) => f(x, ss[i])), [xs.length, 1]);
      return new Jet(tf, col((x, s) => Math.log(q(x, s))), col((x, s) => qx(x, s) / q(x, s)), null, null);
    };
    tf.tidy(() => {
      expect(periodicityLoss(tf, endJet(L)).dataSync()[0]).toBeLessThan(1e-12);
      // Against a point that is not the period (x = L/8): mean of (Δu)² + (Δu_x)², by hand.
      const xo = L / 8;
      let acc = 0;
      for (const s of sNodes) acc += (Math.log(q(0, s)) - Math.log(q(xo, s))) ** 2 + (qx(0, s) / q(0, s) - qx(xo, s) / q(xo, s)) ** 2;
      const hand = acc / sNodes.length;
      expect(hand).toBeGreaterThan(1e-4);
      expect(Math.abs(periodicityLoss(tf, endJet(xo)).dataSync()[0] / hand - 1)).toBeLessThan(1e-5);
      const xg = Array.from({ length: 16 }, (_, i) => (i * L) / 16);
      expect(initialConditionLoss(tf, tf.tensor1d(xg.map((x) => Math.log(q(x, 0))))).dataSync()[0]).toBe(0);
      const u1 = xg.map((x) => Math.log(q(x, 0.1)));
      const mean = u1.reduce((a, v) => a + v * v, 0) / u1.length;
      expect(Math.abs(initialConditionLoss(tf, tf.tensor1d(u1)).dataSync()[0] / mean - 1)).toBeLessThan(1e-5);
    });
  });

  it('ScftProblem: the soft terms are the formulas through both propagator networks; exact forms give an exact 0', () => {
    const make = (periodicity: 'exact' | 'soft', initialCondition: 'exact' | 'soft') => {
      const config = trainConfigSchema.parse({
        version: 2,
        kind: 'train',
        system: { chain: { type: 'diblock', f: F }, chiN: 14 },
        networks: { field: { hidden: [6] }, propagator: { hidden: [8, 8], periodicity, initialCondition } },
        collocation: { nx: 8, nodesPerBlock: 4, random: 0 },
      });
      const chain = buildChain(config.system.chain);
      const nets = buildScftNetworks(tf, config, chain, L, true);
      return { nets, problem: new ScftProblem(tf, nets, config.system, config.collocation, 'detached'), chain };
    };
    const soft = make('soft', 'soft');
    expect(soft.nets.shared).toBe(false); // f = 0.4: q and q† are two networks, both must be covered
    const named = soft.nets.parameters.namedWeights();
    const u64For = (name: string, bounds: number[]) => {
      const pieces = [0, 1].map((p) => readMlp(named, `${name}/piece${p}`));
      return (x: number, s: number) => logQ64(pieces, bounds, 'tanh', L, 3, x, s, undefined, { periodicity: true, initialCondition: true })[0];
    };
    const uq = u64For('q', [0, F, 1]);
    const uqd = u64For('qDagger', [0, 1 - F, 1]);
    const ends = (u: (x: number, s: number) => number, nodes: Float64Array) => {
      let acc = 0;
      for (const s of nodes) acc += (u(0, s) - u(L, s)) ** 2 + (fd((t) => u(t, s), 0).d1 - fd((t) => u(t, s), L).d1) ** 2;
      return acc / nodes.length;
    };
    const nodes = contourFromSteps(soft.chain, soft.chain.blocks.map(() => 4)).s;
    const nodesR = contourFromSteps(soft.nets.reversed, soft.nets.reversed.blocks.map(() => 4)).s;
    const periodicity64 = 0.5 * (ends(uq, nodes) + ends(uqd, nodesR));
    const xg = new PeriodicCell(L, 8).x;
    const initial64 = [...xg].reduce((a, x) => a + uq(x, 0) ** 2 + uqd(x, 0) ** 2, 0) / (2 * xg.length);
    const t = tf.tidy(() => {
      const terms = soft.problem.terms();
      return { periodicity: terms.periodicity.dataSync()[0], initial: terms.initial.dataSync()[0], propagatorOnly: soft.problem.terms(true, true).initial.dataSync()[0] };
    });
    expect(periodicity64).toBeGreaterThan(1e-3);
    expect(initial64).toBeGreaterThan(1e-4);
    expect(Math.abs(t.periodicity / periodicity64 - 1)).toBeLessThan(2e-4);
    expect(Math.abs(t.initial / initial64 - 1)).toBeLessThan(2e-4);
    // The alternating strategy's propagator-only pass keeps the soft terms.
    expect(t.propagatorOnly).toBe(t.initial);
    expect(soft.problem.isActive('periodicity') && soft.problem.isActive('initial')).toBe(true);
    soft.problem.dispose();
    soft.nets.dispose();

    const exact = make('exact', 'exact');
    tf.tidy(() => {
      const terms = exact.problem.terms();
      expect(terms.periodicity.dataSync()[0]).toBe(0);
      expect(terms.initial.dataSync()[0]).toBe(0);
    });
    expect(exact.problem.isActive('periodicity') || exact.problem.isActive('initial')).toBe(false);
    exact.problem.dispose();
    exact.nets.dispose();
  });
});

/**
 * Per-step timing and per-kernel breakdown of one training step on the WASM backend
 * (issue 7), for
 *   - the like-for-like step (src/bench/like-for-like.ts) in its 'plain' and 'fast' builds,
 *     side by side with the same step in PyTorch (bench/pytorch/mde_step.py, one thread)
 *     when python3 with torch is installed;
 *   - the real trainer step: ScftProblem.terms → tf.variableGrads → Adam.apply, with the
 *     default 'alternating' weights (MDE term only), f = 0.5, χN = 15 diblock.
 *
 * Kernel times come from tf.profile: the engine times every kernel with the backend's
 * timer, which on WASM is the wall time of the synchronous kernel call. The remainder
 * (step wall time − Σ kernel time) is JavaScript overhead: tape, tensor bookkeeping,
 * gradient functions. Every figure is a median over repeats, taken on whatever else the
 * machine is doing (the bench prints the load average).
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, writeFileSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import type * as TfModule from '@tensorflow/tfjs';
import { trainConfigSchema } from '../io/schemas/train-config.js';
import { buildChain } from '../physics/chain.js';
import { Adam } from '../autodiff/adam.js';
import { selectBackend } from '../autodiff/backend.js';
import type { Tf } from '../autodiff/tf.js';
import { buildScftNetworks } from '../network/scft-networks.js';
import { LOSS_TERMS } from '../network/losses/terms.js';
import type { LossValues } from '../network/losses/terms.js';
import { ScftProblem } from '../network/problem/scft-problem.js';
import { median, timeIt } from './timing.js';
import { findTorchPython, torchThreadEnv } from './torch-python.js';
import { likeForLikePoints, likeForLikeProblem, LIKE_FOR_LIKE_LEARNING_RATE, LIKE_FOR_LIKE_NX, LIKE_FOR_LIKE_PERIOD } from './like-for-like.js';

export const SIZES: Array<[width: number, points: number]> = [
  [32, 2048],
  [64, 4096],
];

export interface KernelRow {
  key: string;
  ms: number;
  calls: number;
}

/** Kernel times of one call of `step`, summed per kernel name and input shapes. */
export async function profileStep(tf: Tf, step: () => void): Promise<{ rows: KernelRow[]; kernelMs: number; wallMs: number; kernels: number }> {
  const t0 = performance.now();
  const info = await tf.profile(() => {
    step();
  });
  const wallMs = performance.now() - t0;
  const byKey = new Map<string, KernelRow>();
  let kernelMs = 0;
  let kernels = 0;
  for (const k of info.kernels) {
    const ms = typeof k.kernelTimeMs === 'number' ? k.kernelTimeMs : 0;
    // A tf.customGrad op is recorded under its scope name ('forward' inside variableGrads)
    // with a time that includes the kernels inside it, which are recorded too: shown, not summed.
    const wrapper = !tf.getKernel(k.name, tf.getBackend());
    if (!wrapper) {
      kernelMs += ms;
      kernels += 1;
    }
    const key = `${wrapper ? `(custom op "${k.name}", includes its kernels)` : k.name} ${k.inputShapes.map((s) => `[${s ?? ''}]`).join('')}`;
    const row = byKey.get(key) ?? { key, ms: 0, calls: 0 };
    row.ms += ms;
    row.calls += 1;
    byKey.set(key, row);
  }
  return { rows: [...byKey.values()].sort((a, b) => b.ms - a.ms), kernelMs, wallMs, kernels };
}

function printProfile(label: string, p: Awaited<ReturnType<typeof profileStep>>, top: number): void {
  console.log(`    ${label}: ${p.kernels} kernel calls, Σ kernel ${p.kernelMs.toFixed(1)} ms of ${p.wallMs.toFixed(1)} ms profiled wall; top ${top}:`);
  for (const r of p.rows.slice(0, top)) console.log(`      ${r.ms.toFixed(2).padStart(8)} ms ${String(r.calls).padStart(4)}×  ${r.key}`);
}

/** The real trainer step's pieces for one size (f = 0.5, χN = 15 diblock, default losses). */
function trainerStep(tf: Tf, width: number, points: number) {
  const nx = 64;
  const nodesPerBlock = Math.max(2, 2 * Math.round((points / nx - 1) / 4));
  const hidden = [width, width, width];
  const config = trainConfigSchema.parse({
    version: 2,
    kind: 'train',
    system: { chain: { type: 'diblock', f: 0.5 }, chiN: 15 },
    networks: { field: { hidden }, propagator: { hidden } },
    collocation: { nx, nodesPerBlock },
  });
  const chain = buildChain(config.system.chain);
  // 4.0 Rg: about the lamellar period at χN = 15 (the exact value does not change the cost).
  const nets = buildScftNetworks(tf, config, chain, 4.0, true);
  const problem = new ScftProblem(tf, nets, config.system, config.collocation, 'detached');
  problem.resample(0);
  // As train-run.ts does for the alternating strategy: fields change only at field updates.
  problem.fieldsFrozen = true;
  const adam = new Adam(tf, nets.parameters);
  const vars = nets.parameters.variables();
  const weights = Object.fromEntries(LOSS_TERMS.map((k) => [k, k === 'mde' ? 1 : 0])) as LossValues;
  // The body of runTraining's step (train-loop.ts), without the logging around it.
  const step = () =>
    tf.tidy(() => {
      let parts!: Record<(typeof LOSS_TERMS)[number], TfModule.Scalar>;
      const { value, grads } = tf.variableGrads(() => {
        parts = problem.terms();
        let t = tf.mul(parts.mde, weights.mde) as TfModule.Scalar;
        for (const k of LOSS_TERMS) if (k !== 'mde') t = tf.add(t, tf.mul(parts[k], weights[k])) as TfModule.Scalar;
        return t;
      }, vars);
      value.dataSync();
      adam.apply(grads, 1e-3);
    });
  const gridPoints = nx * (2 * nodesPerBlock + 1);
  return { step, gridPoints, extra: config.collocation.random, dispose: () => (problem.dispose(), adam.dispose(), nets.dispose()) };
}

interface TorchResult {
  ms: number[];
  losses: number[];
  threads: number;
  torch: string;
  blas: string;
}

/** Run the PyTorch twin of the like-for-like step on the same weights; null if torch is absent. */
function torchStep(width: number, points: number, weights: object, steps: number, rounds: number, threads = 1): TorchResult | string {
  const script = join(process.cwd(), 'bench', 'pytorch', 'mde_step.py');
  if (!existsSync(script)) return `no ${script}`;
  const dir = mkdtempSync(join(tmpdir(), 'mesofield-torch-'));
  const file = join(dir, 'weights.json');
  const { x, s } = likeForLikePoints(points);
  writeFileSync(file, JSON.stringify({ ...weights, x: Array.from(x), s: Array.from(s), period: LIKE_FOR_LIKE_PERIOD, learningRate: LIKE_FOR_LIKE_LEARNING_RATE }));
  const found = findTorchPython();
  if ('reason' in found) return `not run (${found.reason})`;
  // The same number of threads for every pool torch may use (its own, OpenMP, OpenBLAS).
  const r = spawnSync(found.python, [script, file, String(steps), String(rounds), String(threads)], { encoding: 'utf8', env: torchThreadEnv(threads) });
  if (r.status === 0) return JSON.parse(r.stdout.trim().split('\n').pop()!) as TorchResult;
  return `not run (${found.python}: ${(r.stderr || r.error?.message || '').trim().split('\n').pop()})`;
}

export async function runStepProfile(opts: { top?: number; rounds?: number; steps?: number } = {}): Promise<void> {
  const top = opts.top ?? 8;
  const rounds = opts.rounds ?? 3;
  const steps = opts.steps ?? 20;
  let tf: Tf;
  try {
    tf = (await selectBackend('wasm')).tf;
  } catch (e) {
    console.log(`\nstep profile: wasm backend not available (${(e as Error).message.split('\n')[0]})`);
    return;
  }
  console.log(`\nstep profile, wasm backend, one thread (load average ${loadavg().map((l) => l.toFixed(1)).join(' ')}; medians of ${rounds} rounds × ${steps} steps)`);
  console.log(`  like-for-like step: tanh MLP 2 → 3×H → 1, value/∂x/∂xx/∂s channels, mean r², Adam; grid ${LIKE_FOR_LIKE_NX} x × n/${LIKE_FOR_LIKE_NX} s`);
  for (const [width, points] of SIZES) {
    const p = likeForLikeProblem(tf, width, points);
    const initialWeights = p.weights();
    // The first three steps (also the warm-up) give losses to compare with PyTorch's.
    const firstLosses = [0, 1, 2].map(() => p.step('fast'));
    const plainRounds: number[] = [];
    const fastRounds: number[] = [];
    for (let r = 0; r < rounds; r++) {
      plainRounds.push(timeIt(() => p.step('plain'), Math.max(5, steps >> 2)));
      fastRounds.push(timeIt(() => p.step('fast'), steps));
    }
    const torch = torchStep(width, points, initialWeights, steps, rounds);
    // Both cores, to set beside the data-parallel split of the step (data-parallel.ts).
    const torch2 = typeof torch === 'string' ? null : torchStep(width, points, initialWeights, steps, rounds, 2);
    // tfjs again after torch, so both see the same load.
    for (let r = 0; r < rounds; r++) fastRounds.push(timeIt(() => p.step('fast'), steps));
    const torchText =
      typeof torch === 'string'
        ? `PyTorch: ${torch}`
        : `PyTorch ${torch.torch} (BLAS ${torch.blas.split(', ').map((b) => b.split('/').pop()).join(', ')}) 1 thread ${median(torch.ms).toFixed(1)} ms [${torch.ms.map((m) => m.toFixed(1)).join(', ')}]` +
          (torch2 && typeof torch2 !== 'string' ? `, 2 threads ${median(torch2.ms).toFixed(1)} ms` : '');
    const fmt = (ls: number[]) => ls.map((l) => l.toPrecision(6)).join(', ');
    const lossCheck = typeof torch === 'string' ? '' : `\n    first 3 losses (same weights): tfjs ${fmt(firstLosses)}; torch ${fmt(torch.losses)}`;
    console.log(
      `  H = ${width}, ${points} points: tfjs plain ${median(plainRounds).toFixed(1)} ms, tfjs fast ${median(fastRounds).toFixed(1)} ms [${fastRounds.map((m) => m.toFixed(1)).join(', ')}], ${torchText}${lossCheck}`,
    );
    printProfile('fast step', await profileStep(tf, () => p.step('fast')), top);
    p.dispose();
  }
  console.log('  real trainer step (ScftProblem.terms + variableGrads + Adam.apply; f = 0.5, χN = 15; field + shared q networks 3×H; alternating weights):');
  for (const [width, points] of SIZES) {
    const t = trainerStep(tf, width, points);
    const ms: number[] = [];
    for (let r = 0; r < rounds; r++) ms.push(timeIt(t.step, steps, r === 0 ? 3 : 1));
    console.log(`  H = ${width}, ${t.gridPoints} grid + ${t.extra} extra points per propagator (q and q†): ${median(ms).toFixed(1)} ms/step [${ms.map((m) => m.toFixed(1)).join(', ')}]`);
    printProfile('trainer step', await profileStep(tf, t.step), top);
    t.dispose();
  }
}

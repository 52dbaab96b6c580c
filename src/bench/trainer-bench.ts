/**
 * Timing of the network trainer (not a test: prints figures, never fails on a time).
 *  1. ms per Adam step of the SCFT loss for 3×32 and 3×64 propagator networks at about
 *     2048 and 4096 grid points per propagator, on each backend that loads here;
 *  2. time and steps for the warm-started f = 0.5, χN = 15 diblock to reach φA relative
 *     L2 below 1e-2 and below 1e-3 (evaluated every 25 Adam steps and after every L-BFGS
 *     cycle of 300 iterations), and the final errors.
 */
import { trainConfigSchema } from '../io/schemas/train-config.js';
import { selectBackend } from '../autodiff/backend.js';
import type { BackendName } from '../autodiff/backend.js';
import { trainRun } from '../training/train-run.js';

const system = { chain: { type: 'diblock' as const, f: 0.5 }, chiN: 15 };

async function stepTime(backend: BackendName, width: number, points: number): Promise<number> {
  // Grid points per propagator ≈ nx × (2·nodesPerBlock + 1); pick nodesPerBlock for the target.
  const nx = 64;
  const nodesPerBlock = Math.max(2, 2 * Math.round((points / nx - 1) / 4));
  const steps = backend === 'cpu' ? 6 : 25;
  const config = trainConfigSchema.parse({
    version: 2,
    kind: 'train',
    system,
    backend,
    networks: { field: { hidden: [width, width, width] }, propagator: { hidden: [width, width, width] } },
    collocation: { nx, nodesPerBlock, random: 0 },
    warmStart: { type: 'none' },
    training: { adamSteps: steps, strategy: 'joint', logEvery: steps },
  });
  const r = await trainRun({ config, backend });
  return (1000 * r.history[r.history.length - 1].seconds) / steps;
}

/** Transfer from a χN = 15 checkpoint to χN = 17 against a warm start from the χN = 17 reference, both to φA error 1e-2. */
async function transferBench(): Promise<void> {
  const { mkdtempSync } = await import('node:fs');
  const { tmpdir } = await import('node:os');
  const { join } = await import('node:path');
  const dir = join(mkdtempSync(join(tmpdir(), 'mesofield-bench-')), 'chiN15');
  const base = { version: 2, kind: 'train', backend: 'wasm', cell: { nx: 64, ns: 100 } } as const;
  await trainRun({ config: trainConfigSchema.parse({ ...base, system, warmStart: { adamSteps: 400, learningRate: 0.01 }, training: { adamSteps: 300, learningRate: 1e-3 } }), outDir: dir, backend: 'wasm' });
  const target = { adamSteps: 2000, learningRate: 1e-3, evaluateEvery: 25, targetPhiError: 1e-2, fieldUpdateEvery: 25 };
  const to17 = { chain: system.chain, chiN: 17 };
  const t1 = performance.now();
  const tr = await trainRun({ config: trainConfigSchema.parse({ ...base, system: to17, initFrom: dir, training: target }), backend: 'wasm' });
  const transferWall = (performance.now() - t1) / 1000;
  const t2 = performance.now();
  const ws = await trainRun({ config: trainConfigSchema.parse({ ...base, system: to17, warmStart: { adamSteps: 400, learningRate: 0.01 }, training: target }), backend: 'wasm' });
  const warmWall = (performance.now() - t2) / 1000;
  const say = (r: typeof tr) => (r.metrics.training.reachedTarget ? `step ${r.metrics.training.reachedTarget.step}` : 'not reached');
  console.log(`\ntransfer χN 15 → 17 (to φA error 1e-2): from the checkpoint ${say(tr)}, ${transferWall.toFixed(1)} s wall; warm start from the χN = 17 reference ${say(ws)} after ${ws.metrics.training.warmStart?.adamSteps} fitting steps, ${warmWall.toFixed(1)} s wall`);
}

export async function runTrainerBench(): Promise<void> {
  console.log('\nnetwork trainer: ms per Adam step (joint loss, field + q + q† networks, per-block pieces)');
  for (const backend of ['native', 'wasm', 'cpu'] as BackendName[]) {
    try {
      await selectBackend(backend);
    } catch (e) {
      console.log(`  ${backend}: not available (${(e as Error).message.split('\n')[0]})`);
      continue;
    }
    for (const [width, points] of [
      [32, 2048],
      [64, 4096],
    ]) {
      const ms = await stepTime(backend, width, points);
      console.log(`  ${backend.padEnd(6)} 3×${width}, ~${points} points per propagator: ${ms.toFixed(1)} ms/step (includes one-time set-up)`);
    }
  }
  await transferBench();
  console.log('\nwarm-started f = 0.5, χN = 15 diblock, default config (alternating strategy), wasm:');
  for (const target of [1e-2, 1e-3]) {
    const config = trainConfigSchema.parse({
      version: 2,
      kind: 'train',
      system,
      backend: 'wasm',
      cell: { nx: 64, ns: 100 },
      warmStart: { type: 'reference', adamSteps: 400, learningRate: 0.01 },
      // The recipe of configs/diblock-symmetric-chiN15.train.json: Adam, then L-BFGS cycles (field update before each).
      training: { adamSteps: 300, learningRate: 0.001, evaluateEvery: 25, targetPhiError: target, lbfgsIterations: 2400, lbfgsCycles: 8 },
    });
    const t0 = performance.now();
    const r = await trainRun({ config, backend: 'wasm' });
    const wall = (performance.now() - t0) / 1000;
    const hit = r.metrics.training.reachedTarget;
    const ws = r.metrics.training.warmStart;
    console.log(
      `  target ${target}: ${hit ? `reached at Adam step ${hit.step}${hit.lbfgsIterations !== undefined ? ` + ${hit.lbfgsIterations} L-BFGS iterations` : ''}, ${hit.seconds.toFixed(1)} s of training` : 'not reached in 300 Adam steps + 2400 L-BFGS iterations'} ` +
        `(+ warm start ${ws?.adamSteps} steps, ${ws?.seconds.toFixed(1)} s; wall ${wall.toFixed(1)} s incl. reference solve); ` +
        `final φA rel L2 ${r.metrics.errors.phiA.relativeL2.toExponential(2)}, wA − wB rel L2 ${r.metrics.errors.exchangeField.relativeL2.toExponential(2)}, F error ${r.metrics.errors.freeEnergyError.toExponential(2)} kT`,
    );
  }
}

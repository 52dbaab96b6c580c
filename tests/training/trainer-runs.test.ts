import { join } from 'node:path';
import { writeFileSync, truncateSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { selectBackend } from '../../src/autodiff/backend.js';
import { loadCheckpoint } from '../../src/training/checkpoint.js';
import { trainRun, TrainingStopped } from '../../src/training/train-run.js';
import { symmetricDiblock, tmp } from './trainer-configs.js';

// The warm start, checkpoint reload and transfer of the same diblock are in trainer.test.ts.
describe('trainer: symmetric diblock, seeded repeats, resume and failures', () => {
  const base = symmetricDiblock;
  // What these tests check (seeded repeats, resume continuity, checkpoint refusal, the divergence
  // stop) does not depend on the network size: smaller networks and fewer random collocation
  // points than the warm-start accuracy test keep them cheap.
  const small = { ...base, cell: { ...base.cell, nx: 32 }, networks: { ...base.networks, field: { ...base.networks.field, hidden: [16, 16] }, propagator: { ...base.networks.propagator, hidden: [16, 16] } }, collocation: { ...base.collocation, random: 64 } };

  it('seeded runs repeat and a resumed run continues the same loss curve', async () => {
    const short = { ...small, warmStart: { ...base.warmStart, adamSteps: 20 }, collocation: { ...small.collocation, resampleEvery: 25 }, training: { ...base.training, adamSteps: 60, checkpointEvery: 30, fieldUpdateEvery: 35, logEvery: 5 } };
    const a = await trainRun({ config: short, backend: 'wasm' });
    const half = join(tmp(), 'half');
    const b = await trainRun({ config: { ...short, training: { ...short.training, adamSteps: 30 } }, outDir: half, backend: 'wasm' });
    // The seeded repeat: the 30-step run that the resume starts from retraces the first 30 steps
    // of the 60-step run exactly (one run fewer than repeating the 60 steps).
    expect(b.history[b.history.length - 1].step).toBe(30);
    expect(b.history.map((h) => h.total)).toEqual(a.history.slice(0, b.history.length).map((h) => h.total));
    const resumed = await trainRun({ config: short, resumeDir: half, outDir: half, backend: 'wasm' });
    // The resume point (30) falls between a resampling (25) and a field update (35): both must carry over.
    const tail = (h: typeof a.history) => h.filter((e) => e.step > 30).map((e) => e.total);
    const ta = tail(a.history);
    const tb = tail(resumed.history);
    expect(tb.length).toBe(ta.length);
    for (let i = 0; i < ta.length; i++) expect(Math.abs(tb[i] / ta[i] - 1)).toBeLessThan(1e-5);
  });

  it('a corrupted or mismatched checkpoint fails with a clear message', async () => {
    const { tf } = await selectBackend('wasm');
    const bad = join(tmp(), 'bad');
    await trainRun({ config: { ...base, warmStart: { ...base.warmStart, adamSteps: 5 }, training: { ...base.training, adamSteps: 2 } }, outDir: bad, backend: 'wasm' });
    const other = { ...base, networks: { ...base.networks, field: { ...base.networks.field, hidden: [8] } } };
    await expect(trainRun({ config: other, resumeDir: bad, backend: 'wasm' })).rejects.toThrow(/does not match the config: networks differ/);
    truncateSync(join(bad, 'weights.bin'), 100);
    expect(() => loadCheckpoint(tf, bad)).toThrow(/corrupted checkpoint: weights.bin has 100 bytes/);
    writeFileSync(join(bad, 'checkpoint.json'), '{"kind": "checkpoint"');
    expect(() => loadCheckpoint(tf, bad)).toThrow(/corrupted checkpoint \(not valid JSON/);
    expect(() => loadCheckpoint(tf, tmp())).toThrow(/not a checkpoint directory/);
  });

  it('a diverging run stops, keeps the last good checkpoint and says so', async () => {
    const out = join(tmp(), 'div');
    // A huge learning rate and a tight divergence factor make the loss jump above its best.
    const wild = { ...small, warmStart: { ...base.warmStart, adamSteps: 50 }, training: { ...base.training, adamSteps: 200, learningRate: 0.5, decay: 1, checkpointEvery: 1, divergenceFactor: 1.5 } };
    const err = await trainRun({ config: wild, outDir: out, backend: 'wasm' }).catch((e) => e);
    expect(err).toBeInstanceOf(TrainingStopped);
    expect(err.reason).toBe('diverged');
    expect(err.message).toMatch(/diverged at step \d+.*last good checkpoint \(step \d+\) is kept/);
    const { tf } = await selectBackend('wasm');
    const kept = loadCheckpoint(tf, out);
    expect(kept.file.step).toBe(err.lastCheckpointStep);
  });
});

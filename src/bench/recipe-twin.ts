/**
 * The PyTorch twin of the adam+lbfgs recipe in the recipe bench (issue 16): from our
 * warm-started networks, the same cycles as the recipe's L-BFGS phase (a field step, then
 * L-BFGS on the propagators' MDE residuals in the frozen fields), with the L-BFGS done by
 * torch.optim.LBFGS in bench/pytorch/recipe_twin.py (one thread, float32) and the field step
 * by our own FieldUpdater, so the two runs differ in the propagators' optimiser alone (the
 * script's header lists every other difference). The twin's time at a cycle is the warm
 * start's seconds plus, over the cycles so far, node's field step and torch's L-BFGS (wall
 * and CPU); the measurements of φ_A are not counted. The best cycle's networks are kept, as
 * our runs keep theirs.
 */
import { spawn } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createInterface } from 'node:readline';
import type { z } from 'zod';
import { formatText } from '../io/formats/file-format.js';
import { blockAt, contourFromSteps } from '../physics/contour.js';
import type { Chain } from '../physics/chain.js';
import type { PropagatorNet } from '../network/propagator-net.js';
import type { ScftNetworks } from '../network/scft-networks.js';
import { EVALUATION_NODES_PER_BLOCK } from '../training/train-run.js';
import type { TrainingStart } from '../training/train-run.js';
import { RECIPE_TWIN_INPUT_VERSION, recipeTwinInputSchema, twinFieldsSchema, twinHelloSchema, twinLbfgsSchema } from './recipe-twin-format.js';
import type { RecipeTwinInput } from './recipe-twin-format.js';
import { torchThreadEnv } from './torch-python.js';

export interface TwinCycle {
  cycle: number;
  /** L-BFGS iterations over the cycles so far. */
  iterations: number;
  /** Warm start + field steps + L-BFGS so far (s, wall; CPU beside it). */
  seconds: number;
  cpuSeconds: number;
  loss: number;
  /** The MDE loss at the cycle's start (after its field step) by the twin and by our problem: the check that both minimise the same loss. */
  startLoss: { twin: number; node: number };
  /** φ_A relative L2 by the twin's own measure, and by ours on the same weights. */
  phiError: number;
  nodePhiError: number;
}

export interface TwinReport {
  torch: string;
  blas: string;
  /** The starting networks' φ_A error by the twin's measure and by ours (the check that both measure alike). */
  start: { twin: number; node: number };
  cycles: TwinCycle[];
  /** Cycle whose networks were kept (lowest φ_A error by our measure). */
  kept: number;
  /** CPU seconds of torch's process in its L-BFGS (the field steps' are node's). */
  torchCpuSeconds: number;
}

/** The propagator networks in the hand-over layout. */
function networkPieces(tf: TrainingStart['tf'], net: PropagatorNet): RecipeTwinInput['networks'][string] {
  return {
    pieces: net.pieces.map((p) => ({
      start: p.start,
      length: p.length,
      layers: p.mlp.layers.map((l) => ({ fanIn: l.kernel.shape[0], fanOut: l.kernel.shape[1]!, kernel: Array.from(l.kernel.dataSync()), bias: Array.from(l.bias.dataSync()) })),
    })),
  };
}

interface SidePoints {
  x: Float64Array;
  s: Float64Array;
  chain: Chain;
}

/** The points the recipe's L-BFGS phase trains each propagator on: its tensor grid, then the extra points it holds. */
function trainingPoints(ctx: TrainingStart): { q: SidePoints; qDagger: SidePoints } {
  const { nets, problem } = ctx;
  // The problem's own tensor grid (its contour nodes per side and x points), not a rebuilt one.
  const gx = problem.xGrid;
  const extra = problem.extraPoints();
  const side = (contour: Float64Array, chain: Chain, more: { x: number[] | Float64Array; s: number[] | Float64Array } | undefined): SidePoints => {
    const n = contour.length * gx.length + (more?.x.length ?? 0);
    const x = new Float64Array(n);
    const s = new Float64Array(n);
    let o = 0;
    for (const sv of contour) for (const xv of gx) ((x[o] = xv), (s[o++] = sv));
    if (more) for (let i = 0; i < more.x.length; i++) ((x[o] = more.x[i]), (s[o++] = more.s[i]));
    return { x, s, chain };
  };
  return { q: side(problem.nodes.s, nets.chain, extra?.q), qDagger: side(problem.nodesReversed.s, nets.reversed, extra?.qDagger) };
}

/** The hand-over file's content for the warm-started networks of ctx. */
export function twinInput(ctx: TrainingStart, points = trainingPoints(ctx)): RecipeTwinInput {
  const { tf, nets, reference } = ctx;
  const cfg = nets.q.config;
  if (cfg.periodicity !== 'exact' || cfg.initialCondition !== 'exact' || cfg.activation !== 'tanh' || nets.cell.kind !== 'periodic' || !nets.field) {
    throw new Error('the PyTorch twin covers a melt in a periodic cell with exact-form tanh propagator networks');
  }
  const networks: RecipeTwinInput['networks'] = { q: networkPieces(tf, nets.q) };
  if (!nets.shared) networks.qDagger = networkPieces(tf, nets.qDagger);
  const side = (p: SidePoints, net: string) => ({ net, x: Array.from(p.x), s: Array.from(p.s), diffusivity: Array.from(p.s, (s) => p.chain.blocks[blockAt(p.chain, s)].diffusivity) });
  const steps = nets.chain.blocks.map(() => EVALUATION_NODES_PER_BLOCK);
  const contour = contourFromSteps(nets.chain, steps);
  const contourR = contourFromSteps(nets.reversed, [...steps].reverse());
  return {
    kind: 'recipe-twin-input',
    version: RECIPE_TWIN_INPUT_VERSION,
    period: nets.length,
    fourierModes: cfg.fourierModes,
    networks,
    sides: { q: side(points.q, 'q'), qDagger: side(points.qDagger, nets.shared ? 'q' : 'qDagger') },
    evaluation: { x: Array.from(reference.x), periods: reference.periods, q: { s: Array.from(contour.s) }, qDagger: { s: Array.from(contourR.s) }, weightsA: Array.from(contour.weights.A), referencePhiA: Array.from(reference.phi.A) },
    lbfgs: { history: 20, gradientTolerance: 1e-9 },
  };
}

/** The field network's w at each point of a side, by the species of the block there (as point-fields.ts gives it). */
function fieldAtPoints(nets: ScftNetworks, p: SidePoints): number[] {
  const feats = nets.field!.features(p.x, false);
  const t = nets.field!.tf.tidy(() => nets.field!.forward(feats).v);
  const w = t.dataSync() as Float32Array;
  t.dispose();
  feats.dispose();
  return Array.from(p.s, (s, i) => (p.chain.blocks[blockAt(p.chain, s)].species === 'A' ? w[2 * i] : w[2 * i + 1]));
}

/** Assign the twin's weights ([kernel, bias] per layer per piece) to our networks. */
function loadTwinWeights(tf: TrainingStart['tf'], nets: ScftNetworks, weights: z.infer<typeof twinLbfgsSchema>['nets']): void {
  const byName: Record<string, PropagatorNet> = { q: nets.q, ...(nets.shared ? {} : { qDagger: nets.qDagger }) };
  for (const [name, net] of Object.entries(byName)) {
    const pieces = weights[name];
    if (!pieces || pieces.length !== net.pieces.length) throw new Error(`PyTorch twin: weights of ${name} missing or of another shape`);
    net.pieces.forEach((p, k) =>
      p.mlp.layers.forEach((l, j) => {
        const [kernel, bias] = pieces[k][j];
        tf.tidy(() => {
          l.kernel.assign(tf.tensor2d(Float32Array.from(kernel), l.kernel.shape as [number, number]));
          l.bias.assign(tf.tensor1d(Float32Array.from(bias)));
        });
      }),
    );
  }
}

/** A line-by-line JSON conversation with the twin's process. */
function conversation(python: string, script: string, file: string) {
  const child = spawn(python, [script, file], { env: torchThreadEnv(1), stdio: ['pipe', 'pipe', 'pipe'] });
  let stderr = '';
  child.stderr.on('data', (d: Buffer) => (stderr += d.toString()));
  // Its last words arrive on stderr, possibly after stdout has closed: wait for the process to end before quoting them.
  const ended = new Promise<number | null>((resolve) => child.on('close', (code) => resolve(code)));
  child.on('error', () => {});
  const lines = createInterface({ input: child.stdout })[Symbol.asyncIterator]();
  const read = async <S extends z.ZodType>(schema: S): Promise<z.infer<S>> => {
    const next = await lines.next();
    if (next.done) {
      const code = await ended;
      throw new Error(`PyTorch twin ended (exit ${code}): ${stderr.trim().split('\n').pop() ?? ''}`);
    }
    return schema.parse(JSON.parse(next.value));
  };
  const send = (cmd: object) => child.stdin.write(`${JSON.stringify(cmd)}\n`);
  const close = () => {
    child.stdin.end();
    if (child.exitCode === null) child.kill();
  };
  return { read, send, close };
}

/** Run the twin from the warm-started networks of ctx: `cycles` × (field step, `iterations` of torch L-BFGS). */
export async function runRecipeTwin(ctx: TrainingStart, python: string, cycles: number, iterations: number): Promise<TwinReport> {
  const { tf, nets, fieldUpdater } = ctx;
  // The extra MDE points of the recipe, drawn as its first Adam step draws them (the twin has no Adam phase).
  if (ctx.config.collocation.random > 0) ctx.problem.resample(0);
  const points = trainingPoints(ctx);
  const dir = mkdtempSync(join(tmpdir(), 'mesofield-twin-'));
  const file = join(dir, 'recipe-twin-input.json');
  writeFileSync(file, formatText(recipeTwinInputSchema, twinInput(ctx, points), 0));
  const talk = conversation(python, join(process.cwd(), 'bench', 'pytorch', 'recipe_twin.py'), file);
  try {
    const hello = await talk.read(twinHelloSchema);
    const start = { twin: hello.phiError, node: ctx.phiError() };
    const out: TwinCycle[] = [];
    let seconds = ctx.warmStartSeconds;
    let cpuSeconds = 0;
    let total = 0;
    let torchCpuSeconds = 0;
    let best: { cycle: number; error: number; weights: Float64Array } | null = null;
    for (let c = 1; c <= cycles; c++) {
      const cpu0 = process.cpuUsage();
      const t0 = performance.now();
      // The recipe's polish cycle starts with a field step when it has more than one cycle (train-run.ts).
      if (cycles > 1) fieldUpdater.update();
      const w = { q: fieldAtPoints(nets, points.q), qDagger: fieldAtPoints(nets, points.qDagger) };
      const cpu = process.cpuUsage(cpu0);
      seconds += (performance.now() - t0) / 1000;
      cpuSeconds += (cpu.user + cpu.system) / 1e6;
      talk.send({ cmd: 'fields', w });
      const twinStart = (await talk.read(twinFieldsSchema)).loss;
      // Our L-BFGS phase's loss in these fields (train-loop.ts polishCycle; fields frozen, so refreshed here).
      ctx.problem.invalidateFields();
      const nodeStart = tf.tidy(() => ctx.problem.terms(true, true).mde.dataSync()[0]);
      talk.send({ cmd: 'lbfgs', iterations });
      const r = await talk.read(twinLbfgsSchema);
      seconds += r.wallSeconds;
      cpuSeconds += r.cpuSeconds;
      torchCpuSeconds += r.cpuSeconds;
      total += r.iterations;
      loadTwinWeights(tf, nets, r.nets);
      const nodePhiError = ctx.phiError();
      out.push({ cycle: c, iterations: total, seconds, cpuSeconds, loss: r.loss, startLoss: { twin: twinStart, node: nodeStart }, phiError: r.phiError, nodePhiError });
      if (!best || nodePhiError < best.error) best = { cycle: c, error: nodePhiError, weights: nets.parameters.flatten() };
    }
    talk.send({ cmd: 'quit' });
    if (best) nets.parameters.unflatten(best.weights);
    return { torch: hello.torch, blas: hello.blas, start, cycles: out, kept: best?.cycle ?? 0, torchCpuSeconds };
  } finally {
    talk.close();
    rmSync(dir, { recursive: true, force: true });
  }
}

/**
 * The hand-over file of the recipe bench's PyTorch twin (src/bench/recipe-twin-format.ts):
 * what node writes for warm-started networks reads back through its schema with every
 * weight as the networks hold it, and a file that is broken in the ways a hand-over can
 * break (a kernel of the wrong size, lengths that disagree, a side naming no network) is
 * refused. Torch itself is not needed here (it is optional; the bench checks the twin's
 * measure and loss against ours when it runs).
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { selectBackend, type Tf } from '../../src/autodiff/backend.js';
import { trainConfigSchema } from '../../src/io/schemas/train-config.js';
import { buildChain } from '../../src/physics/chain.js';
import { buildScftNetworks } from '../../src/network/scft-networks.js';
import { ScftProblem } from '../../src/network/problem/scft-problem.js';
import type { ScftNetworks } from '../../src/network/scft-networks.js';
import { twinInput } from '../../src/bench/recipe-twin.js';
import type { TrainingStart } from '../../src/training/train-run.js';
import { recipeTwinInputSchema } from '../../src/bench/recipe-twin-format.js';
import type { RecipeTwinInput } from '../../src/bench/recipe-twin-format.js';

const PERIOD = 3.7;
const NX = 16;

function networksFor(tf: Tf, chain: Record<string, unknown>): { nets: ScftNetworks; config: ReturnType<typeof trainConfigSchema.parse> } {
  const config = trainConfigSchema.parse({
    version: 2,
    kind: 'train',
    system: { chain, chiN: 15 },
    networks: { field: { hidden: [4] }, propagator: { hidden: [5, 3], seed: 3 } },
    collocation: { nx: 8, nodesPerBlock: 4, random: 0 },
  });
  return { nets: buildScftNetworks(tf, config, buildChain(config.system.chain), PERIOD, true), config };
}

/** The file's content for the networks, at the tensor grid (no extra points), against a made-up φ_A on NX points. */
function inputFor(tf: Tf, nets: ScftNetworks, config: TrainingStart['config']): RecipeTwinInput {
  const x = Float64Array.from({ length: NX }, (_, j) => (j * PERIOD) / NX);
  const reference = { x, periods: 1, phi: { A: x.map((v) => 0.5 + 0.4 * Math.cos((2 * Math.PI * v) / PERIOD)) } } as unknown as TrainingStart['reference'];
  // The run's own problem: its tensor grid is where the twin's points come from.
  const problem = new ScftProblem(tf, nets, config.system, config.collocation);
  try {
    return twinInput({ tf, nets, config, reference, problem } as TrainingStart);
  } finally {
    problem.dispose();
  }
}

describe('the PyTorch twin hand-over file', () => {
  let tf: Tf;
  beforeAll(async () => {
    tf = (await selectBackend('wasm')).tf;
  });

  it('holds every weight of the networks as they are, one network when q and q† are one, and reads back through its schema', () => {
    // An ABA triblock reads the same from both ends (one network for q and q†); an AB diblock does not.
    for (const [chain, shared] of [
      [{ type: 'triblock', f: 0.5 }, true],
      [{ type: 'diblock', f: 0.5 }, false],
    ] as const) {
      const { nets, config } = networksFor(tf, chain);
      const file = recipeTwinInputSchema.parse(JSON.parse(JSON.stringify(inputFor(tf, nets, config))));
      expect(Object.keys(file.networks).sort()).toEqual(shared ? ['q'] : ['q', 'qDagger']);
      expect(file.sides.qDagger.net).toBe(shared ? 'q' : 'qDagger');
      const held = Object.values(file.networks).flatMap((n) => n.pieces.flatMap((p) => p.layers.flatMap((l) => [...l.kernel, ...l.bias])));
      const flat = nets.parameters.flatten();
      // The field network comes first in the parameter set (scft-networks.ts); the rest are the propagators, in order.
      expect(held).toEqual(Array.from(flat.subarray(flat.length - held.length)));
      expect(held.length).toBe(flat.length - nets.field!.parameters.size);
      // The tensor grid: nx = 8 points at each contour node (4 steps per block, + 1).
      expect(file.sides.q.x.length).toBe(8 * (4 * nets.chain.blocks.length + 1));
      nets.dispose();
    }
  });

  it('gives each point the diffusivity of its block, a junction point that of the later block', () => {
    // b_A/b_B = 1.5: a Gaussian block's diffusivity goes as its segment length squared, so D_A/D_B = 2.25
    // (common practice, no source); a point at the junction belongs to the later block (propagator-net.ts).
    const { nets, config } = networksFor(tf, { type: 'diblock', f: 0.5, segmentRatio: 1.5 });
    const file = inputFor(tf, nets, config);
    const D = new Map<number, number>();
    file.sides.q.s.forEach((s, i) => D.set(s, file.sides.q.diffusivity[i]));
    const dA = D.get(0)!;
    const dB = D.get(1)!;
    expect(dA / dB).toBeCloseTo(2.25, 12);
    expect(D.get(0.5)).toBe(dB);
    nets.dispose();
  });

  it('refuses a kernel of the wrong size, lengths that disagree and a side naming no network', () => {
    const { nets, config } = networksFor(tf, { type: 'diblock', f: 0.35 });
    const good = inputFor(tf, nets, config);
    nets.dispose();
    const broken = (edit: (f: RecipeTwinInput) => void) => {
      const f = JSON.parse(JSON.stringify(good)) as RecipeTwinInput;
      edit(f);
      return recipeTwinInputSchema.safeParse(f).success;
    };
    expect(broken(() => {})).toBe(true);
    expect(broken((f) => f.networks.q.pieces[0].layers[0].kernel.pop())).toBe(false);
    expect(broken((f) => f.sides.q.diffusivity.pop())).toBe(false);
    expect(broken((f) => f.evaluation.referencePhiA.pop())).toBe(false);
    expect(broken((f) => (f.sides.qDagger.net = 'r'))).toBe(false);
    expect(broken((f) => (f.networks.q.pieces[0].layers[1].fanIn += 1))).toBe(false);
  });
});

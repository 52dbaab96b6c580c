/**
 * The hand-over between the recipe bench and its PyTorch twin (bench/pytorch/recipe_twin.py):
 * the input file node writes (kind "recipe-twin-input": the propagator networks' weights after
 * the warm start, the collocation points of each propagator with D at each point, the
 * evaluation grid and the reference φ_A) and the JSON lines the twin answers with. One schema
 * each; the file is written through its schema (io/formats/file-format.ts).
 *
 * Layout: a kernel is [fanIn, fanOut] row-major, as tfjs holds it; x in Rg, s ∈ [0, 1] along
 * the side's own chain (the reversed chain for q†), D = (b_K/b)² of the block at the point.
 */
import { z } from 'zod';
import { formatHeader } from '../io/formats/file-format.js';

export const RECIPE_TWIN_INPUT_VERSION = 1;

const finite = z.number().finite();

const layerSchema = z
  .object({ fanIn: z.number().int().min(1), fanOut: z.number().int().min(1), kernel: z.array(finite), bias: z.array(finite) })
  .strict()
  .refine((l) => l.kernel.length === l.fanIn * l.fanOut && l.bias.length === l.fanOut, { message: 'kernel must hold fanIn·fanOut values and bias fanOut' });

const pieceSchema = z
  .object({ start: z.number().min(0).lt(1), length: z.number().gt(0).lte(1), layers: z.array(layerSchema).min(1) })
  .strict()
  .refine((p) => p.layers.every((l, i) => i === 0 || l.fanIn === p.layers[i - 1].fanOut) && p.layers[p.layers.length - 1].fanOut === 1, {
    message: 'layers must chain (each fanIn the previous fanOut) and end in one output',
  });

const sideSchema = z
  .object({ net: z.string().min(1), x: z.array(finite), s: z.array(z.number().min(0).max(1)), diffusivity: z.array(z.number().gt(0)) })
  .strict()
  .refine((s) => s.x.length > 0 && s.s.length === s.x.length && s.diffusivity.length === s.x.length, { message: 'x, s and diffusivity must be non-empty and of one length' });

export const recipeTwinInputSchema = z
  .object({
    ...formatHeader('recipe-twin-input', RECIPE_TWIN_INPUT_VERSION),
    /** Cell length L (Rg), one lamellar period per `evaluation.periods`. */
    period: z.number().gt(0),
    fourierModes: z.number().int().min(1),
    /** Propagator networks by name ("q", and "qDagger" unless q is shared), pieces in chain order. */
    networks: z.record(z.string(), z.object({ pieces: z.array(pieceSchema).min(1) }).strict()),
    sides: z.object({ q: sideSchema, qDagger: sideSchema }).strict(),
    evaluation: z
      .object({
        x: z.array(finite).min(4),
        periods: z.number().int().min(1),
        q: z.object({ s: z.array(z.number().min(0).max(1)).min(3) }).strict(),
        qDagger: z.object({ s: z.array(z.number().min(0).max(1)).min(3) }).strict(),
        /** Simpson weights of species A on q's contour nodes. */
        weightsA: z.array(finite),
        referencePhiA: z.array(finite),
      })
      .strict()
      .refine((e) => e.referencePhiA.length === e.x.length && e.weightsA.length === e.q.s.length && e.qDagger.s.length === e.q.s.length, {
        message: 'referencePhiA must match x, and weightsA and qDagger.s the q contour',
      }),
    lbfgs: z.object({ history: z.number().int().min(1), gradientTolerance: z.number().min(0) }).strict(),
  })
  .strict()
  .refine((f) => [f.sides.q.net, f.sides.qDagger.net].every((n) => n in f.networks), { message: 'sides must name networks of the file' });

export type RecipeTwinInput = z.infer<typeof recipeTwinInputSchema>;

/** The twin's first line: what it runs on and its measure of the starting networks. */
export const twinHelloSchema = z.object({ ok: z.literal(true), torch: z.string(), threads: z.number().int(), blas: z.string(), phiError: finite, loss: z.null() }).strict();

/** The answer to a "fields" command: the loss in the new fields. */
export const twinFieldsSchema = z.object({ ok: z.literal(true), loss: finite }).strict();

/** The answer to an "lbfgs" command: the weights per network as [kernel, bias] per layer per piece. */
export const twinLbfgsSchema = z
  .object({
    iterations: z.number().int().min(0),
    evaluations: z.number().int().min(0),
    loss: finite,
    cpuSeconds: z.number().min(0),
    wallSeconds: z.number().min(0),
    phiError: finite,
    nets: z.record(z.string(), z.array(z.array(z.tuple([z.array(finite), z.array(finite)])))),
  })
  .strict();

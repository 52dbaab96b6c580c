/**
 * The report input of a surrogate checkpoint (checkpoint.json of kind "surrogate-checkpoint",
 * written by src/surrogate/surrogate-checkpoint.ts): only the parts the report draws are
 * checked here, so the report does not load the trainer's modules.
 */
import { z } from 'zod';
import { parseOrThrow } from '../io/errors.js';
import { periodAt } from '../surrogate/period-model.js';
import { sig } from './format.js';
import type { SurrogateInput } from './report-inputs.js';

const point = z.record(z.string(), z.number());

const surrogateFileSchema = z.object({
  periodModel: z.object({ axes: z.array(z.array(z.number())), periods: z.array(z.number()) }),
  anchors: z.array(z.object({ point, period: z.number() }).passthrough()),
  history: z.array(z.object({ round: z.number(), residual: z.number().nullable(), fitLoss: z.number(), phiError: z.number().optional() }).passthrough()),
  metrics: z
    .object({
      parameters: z.array(z.object({ name: z.string(), min: z.number(), max: z.number(), anchors: z.number() })).min(1),
      heldOut: z.array(
        z
          .object({
            point,
            phiA: z.object({ relativeL2: z.number() }).passthrough(),
            freeEnergyError: z.number(),
            period: z.object({ reference: z.number(), relativeError: z.number() }).passthrough(),
            anchorInterpolationPhiA: z.number(),
          })
          .passthrough(),
      ),
      timing: z
        .object({ querySeconds: z.number(), referenceSolveSeconds: z.number(), speedup: z.number(), buildSeconds: z.number(), equivalentReferenceSolves: z.number(), extraSolves: z.object({ count: z.number() }).passthrough() })
        .passthrough(),
    })
    .passthrough(),
});

const SYMBOLS: Record<string, string> = { chiN: 'χN', f: 'f', segmentRatio: 'b_A/b_B' };

export function surrogateInput(raw: unknown, path: string): SurrogateInput {
  const file = parseOrThrow(surrogateFileSchema, raw, path);
  const m = file.metrics;
  const names = m.parameters.map((p) => p.name);
  const values = (p: Record<string, number>) => names.map((n) => p[n]);
  const t = m.timing;
  return {
    parameters: m.parameters.map((p) => ({ ...p, symbol: SYMBOLS[p.name] ?? p.name })),
    anchors: file.anchors.map((a) => ({ values: values(a.point), period: a.period })),
    periodAt: (v) => periodAt(file.periodModel, v),
    heldOut: m.heldOut.map((h) => ({
      values: values(h.point),
      phiARelativeL2: h.phiA.relativeL2,
      freeEnergyError: h.freeEnergyError,
      referencePeriod: h.period.reference,
      periodRelativeError: h.period.relativeError,
      anchorInterpolationPhiA: h.anchorInterpolationPhiA,
    })),
    cellCentres: m.parameters.reduce((n, p) => n * (p.anchors - 1), 1),
    history: file.history,
    buildSeconds: t.buildSeconds,
    timing: [
      `The network was fitted to ${file.anchors.length + t.extraSolves.count} reference solutions (${file.anchors.length} anchors and ${t.extraSolves.count} extra solves at random points), so it is partly a fit to reference data; the physics rounds then drive its fields towards self-consistency at points drawn afresh each round.`,
      `One surrogate query (fields from the network and one propagator solve in them, after start-up): ${sig(1000 * t.querySeconds, 3)} ms; one reference solve at the equilibrium period: ${sig(1000 * t.referenceSolveSeconds, 3)} ms (median over the anchors and held-out points): ${sig(t.speedup, 3)}× faster.`,
      `Building the surrogate (anchor and extra reference solves, fit, physics rounds) took ${sig(t.buildSeconds, 3)} s, the time of ${sig(t.equivalentReferenceSolves, 3)} reference solves: below that many queries a direct solve per point is cheaper.`,
    ],
  };
}

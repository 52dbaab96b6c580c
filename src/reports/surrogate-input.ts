/**
 * The report input of a surrogate checkpoint (checkpoint.json of kind "surrogate-checkpoint",
 * read through its one schema, io/formats/surrogate.ts, which loads no network code).
 */
import { InputError, parseOrThrow } from '../io/errors.js';
import { surrogateCheckpointSchema } from '../io/formats/surrogate.js';
import { periodAt } from '../surrogate/period-model.js';
import { PARAMETER_LABELS } from '../surrogate/parameter-space.js';
import { sig } from './format.js';
import type { SurrogateInput } from './report-inputs.js';


export function surrogateInput(raw: unknown, path: string): SurrogateInput {
  const file = parseOrThrow(surrogateCheckpointSchema, raw, path);
  const m = file.metrics;
  if (!m) throw new InputError(`${path}: metrics: missing; a surrogate checkpoint carries its error map once training finished (train it again)`);
  const names = m.parameters.map((p) => p.name);
  const values = (p: Record<string, number>) => names.map((n) => p[n]);
  const t = m.timing;
  return {
    parameters: m.parameters.map((p) => ({ ...p, symbol: (PARAMETER_LABELS as Record<string, { symbol: string }>)[p.name]?.symbol ?? p.name })),
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

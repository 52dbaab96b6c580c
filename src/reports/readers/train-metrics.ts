/**
 * A train run's metrics.json (training/train-run.ts TrainMetrics) → the network's errors
 * against the reference and the run's wall time. Only the fields the report prints are read.
 */
import { z } from 'zod';
import { parseOrThrow } from '../../io/errors.js';
import type { NetworkMetricsInput } from '../report-inputs.js';

const pair = z.object({ relativeL2: z.number(), maxError: z.number() }).passthrough();
const trainMetricsSchema = z
  .object({
    phase: z.string(),
    errors: z.object({ phiA: pair, exchangeField: pair, QRelativeError: z.number(), freeEnergyError: z.number() }).passthrough(),
    freshResiduals: z.record(z.string(), z.number()).default({}),
    training: z.object({ seconds: z.number() }).passthrough().optional(),
    runSeconds: z.number().optional(),
  })
  .passthrough();

export function readTrainMetrics(raw: unknown, path: string): { metrics: NetworkMetricsInput; runSeconds?: number; runSecondsNote?: string } {
  const m = parseOrThrow(trainMetricsSchema, raw, path);
  const residuals = Object.fromEntries(Object.entries(m.freshResiduals).filter(([, v]) => v > 0));
  const metrics: NetworkMetricsInput = { phiA: m.errors.phiA, exchangeField: m.errors.exchangeField, QRelativeError: m.errors.QRelativeError, freeEnergyError: m.errors.freeEnergyError, freshResiduals: residuals, phase: m.phase };
  if (m.runSeconds !== undefined) return { metrics, runSeconds: m.runSeconds };
  if (m.training) return { metrics, runSeconds: m.training.seconds, runSecondsNote: 'up to the end of training; this run did not record the final evaluation' };
  return { metrics };
}

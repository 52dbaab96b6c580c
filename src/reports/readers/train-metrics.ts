/**
 * A train run's metrics.json (training/train-run.ts TrainMetrics) → the network's errors
 * against the reference and the run's wall time. Read through its schema (io/formats/training.ts).
 */
import { parseOrThrow } from '../../io/errors.js';
import { trainMetricsFileSchema } from '../../io/formats/training.js';
import type { NetworkMetricsInput } from '../report-inputs.js';

export function readTrainMetrics(raw: unknown, path: string): { metrics: NetworkMetricsInput; runSeconds?: number; runSecondsNote?: string } {
  const m = parseOrThrow(trainMetricsFileSchema, raw, path);
  const residuals = Object.fromEntries(Object.entries(m.freshResiduals).filter(([, v]) => v > 0));
  const metrics: NetworkMetricsInput = { phiA: m.errors.phiA, exchangeField: m.errors.exchangeField, QRelativeError: m.errors.QRelativeError, freeEnergyError: m.errors.freeEnergyError, freshResiduals: residuals, phase: m.phase, ...(m.errors.incompressibilityMax !== undefined ? { incompressibilityMax: m.errors.incompressibilityMax } : {}), notes: m.network.notes };
  if (m.runSeconds !== undefined) return { metrics, runSeconds: m.runSeconds };
  if (m.training) return { metrics, runSeconds: m.training.seconds, runSecondsNote: 'up to the end of training; this run did not record the final evaluation' };
  return { metrics };
}

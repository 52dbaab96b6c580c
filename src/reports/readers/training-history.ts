/**
 * A training run's history (the checkpoint's `history`, training/checkpoint.ts) → the records
 * the loss figure draws: one axis of iterations over every phase (warm start, Adam, L-BFGS,
 * and any later phase such as a second-order one), the run's wall time, the loss and the
 * φA error where measured.
 *
 * The entries are the checkpoint's, already read through its format (io/formats/training.ts
 * historyEntrySchema): this file only lays them out on one axis.
 */
import type { HistoryEntry } from '../../io/formats/training.js';
import type { TrainingInput, TrainingPhase, TrainingRecord } from '../report-inputs.js';

const PHASE_NAMES: Record<HistoryEntry['stage'], string> = { 'warm-start': 'warm start', adam: 'Adam', lbfgs: 'L-BFGS', 'second-order': 'second order' };

interface Raw {
  phase: string;
  /** Iteration within the phase (or within the run, for entries that count so). */
  local: number;
  wallSeconds?: number;
  seconds?: number;
  loss: number;
  referenceError?: number;
}

function toRaw(s: HistoryEntry): Raw {
  // L-BFGS and second-order entries keep the Adam step count in `step`; their own count is
  // lbfgsIterations / secondOrderIterations.
  const local = s.stage === 'lbfgs' ? (s.lbfgsIterations ?? s.step) : s.stage === 'second-order' ? (s.secondOrderIterations ?? s.step) : s.step;
  return { phase: PHASE_NAMES[s.stage], local, wallSeconds: s.wallSeconds, seconds: s.seconds, loss: s.total, referenceError: s.phiError };
}

/** Records on one iteration axis: each phase starts where the previous one ended. */
export function trainingRecords(history: HistoryEntry[]): Pick<TrainingInput, 'records' | 'phases' | 'wallClock'> {
  const raw = history.map(toRaw);
  const wallClock = raw.length > 0 && raw.every((r) => r.wallSeconds !== undefined);
  const records: TrainingRecord[] = [];
  const phases: TrainingPhase[] = [];
  let offset = 0;
  let current: { name: string; start: number; first: number } | null = null;
  for (const r of raw) {
    if (!current || current.name !== r.phase) {
      if (current && records.length) offset = records[records.length - 1].iteration;
      // A phase whose steps continue the run's count (Adam after a resume) keeps them; one that restarts at 0 or 1 is shifted.
      current = { name: r.phase, start: offset, first: r.local };
    }
    const iteration = current.first > current.start ? r.local : current.start + r.local;
    records.push({ phase: r.phase, iteration, loss: r.loss, ...(wallClock ? { wallSeconds: r.wallSeconds } : r.seconds !== undefined ? { wallSeconds: r.seconds } : {}), ...(r.referenceError !== undefined ? { referenceError: r.referenceError } : {}) });
  }
  for (const r of records) {
    const last = phases[phases.length - 1];
    if (!last || last.name !== r.phase) {
      phases.push({ name: r.phase, from: r.iteration, to: r.iteration, iterations: 0, wallFrom: r.wallSeconds, wallTo: r.wallSeconds, finalLoss: r.loss, finalReferenceError: r.referenceError });
    }
    const p = phases[phases.length - 1];
    p.to = r.iteration;
    p.wallTo = r.wallSeconds;
    p.finalLoss = r.loss;
    if (r.referenceError !== undefined) p.finalReferenceError = r.referenceError;
  }
  phases.forEach((p, i) => (p.iterations = p.to - (i === 0 ? 0 : phases[i - 1].to)));
  return { records, phases, wallClock };
}

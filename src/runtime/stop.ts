/**
 * One stop flag for the whole process, set by SIGINT (Ctrl-C) or SIGTERM. Long loops (Adam
 * steps, polish cycles, surrogate rounds, sweep points) poll `stopRequested()` and call
 * `yieldToEvents()` so the signal handler gets to run at all: a loop that never yields to the
 * event loop cannot be interrupted in Node. On a stop the run saves a complete checkpoint,
 * says where, and the CLI exits 130 (SIGINT) or 143 (SIGTERM). A second signal while saving
 * is answered with a message and otherwise ignored, so nothing is left half-written.
 */
export type StopSignal = 'SIGINT' | 'SIGTERM';

let requested: StopSignal | null = null;
let saving = false;
let label = 'mesofield';
const SAVING_STOP = 'stopping after this step and saving a checkpoint';
let stoppingText = SAVING_STOP;
let installed = 0;

function onSignal(sig: StopSignal): void {
  if (requested) {
    process.stderr.write(`\n${label}: ${saving ? 'still saving the checkpoint; it finishes in a moment (SIGKILL would lose it)' : stoppingText === SAVING_STOP ? 'already stopping; the checkpoint is being written' : 'already stopping'} — signal ignored\n`);
    return;
  }
  requested = sig;
  controller?.abort();
  process.stderr.write(`\n${label}: ${sig === 'SIGINT' ? 'Ctrl-C' : 'SIGTERM'}: ${stoppingText}\n`);
}
const onInt = () => onSignal('SIGINT');
const onTerm = () => onSignal('SIGTERM');

/**
 * Route SIGINT and SIGTERM to the stop flag while a long command runs; returns the uninstaller.
 * `stopping` is what the first signal's message says will happen (default: a checkpoint is saved).
 */
export function installStopHandlers(commandLabel: string, stopping: string = SAVING_STOP): () => void {
  label = commandLabel;
  stoppingText = stopping;
  if (installed++ === 0) {
    process.on('SIGINT', onInt);
    process.on('SIGTERM', onTerm);
  }
  return () => {
    if (--installed === 0) {
      process.off('SIGINT', onInt);
      process.off('SIGTERM', onTerm);
    }
  };
}

/** Change what a first signal's message says will happen, as a run moves to another stage (its writes, say). */
export function setStoppingText(stopping: string): void {
  stoppingText = stopping;
}

export function stopRequested(): boolean {
  return requested !== null;
}

/** Ask for a stop exactly as a signal does (tests stop a run at a chosen step through this). */
export function requestStop(sig: StopSignal = 'SIGINT'): void {
  onSignal(sig);
}

/** The exit code for the stop that was asked: 130 for SIGINT, 143 for SIGTERM. */
export function stopExitCode(): 130 | 143 {
  return requested === 'SIGTERM' ? 143 : 130;
}

/** Mark the checkpoint save in progress (a second signal then says so). */
export function setSaving(on: boolean): void {
  saving = on;
}

/** Clear the flag (between in-process runs, e.g. in tests). */
export function resetStop(): void {
  requested = null;
  controller = null;
  saving = false;
}

/** Let pending events (signal handlers, worker messages) run: one macrotask turn. */
export function yieldToEvents(): Promise<void> {
  return new Promise((resolve) => setImmediate(resolve));
}

/** A run that stopped on a signal after saving: its message says what was saved and where. */
export class RunStopped extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'RunStopped';
  }
}

let controller: AbortController | null = null;

/** An AbortSignal that fires when a stop is asked (for worker pools, which take one). */
export function stopAbortSignal(): AbortSignal {
  if (!controller || controller.signal.aborted !== (requested !== null)) controller = new AbortController();
  if (requested) controller.abort();
  return controller.signal;
}

/**
 * Signals for the short commands whose work is one synchronous stretch and then writes
 * (report, synth, bragg-pattern, predict, fit-scattering, and the report after invert or
 * train): the same stop line and exit codes (130/143) as the long commands, nothing half-written.
 *
 * Why not stop at once: a Node signal handler runs only when the event loop turns, and this
 * work does not yield (moving a few seconds of work to a worker thread costs more start-up than
 * it saves). So the handler is installed for the whole run, says what will happen, and the run
 * looks at the flag at the one point where it matters, just before its first write: a signal
 * that came during the work stops the run there, with nothing written (exit 130/143). One that
 * comes once the writes have begun lets them finish, and the run then exits 130/143 saying its
 * output is complete. Either way every file is whole (io/atomic-write.ts) and the set of files
 * is all or nothing.
 */
import { installStopHandlers, RunStopped, setStoppingText, stopExitCode, stopRequested, yieldToEvents } from '../runtime/stop.js';

export interface StopPoint {
  /** Let a pending signal be handled, then stop the run (RunStopped: nothing written) if one came. Call just before the first write. */
  beforeWriting(): Promise<void>;
}

/** What a stop says: on the first signal (what will happen), and at the stop point (what happened). */
export interface StopTexts {
  stopping: string;
  stopped: string;
}

/** The texts of a run stopped before its first write; `outDir` is the folder it writes into, if any (left as it was). */
export function nothingWritten(command: string, outDir: string | undefined): StopTexts {
  return {
    stopping: `stopping the ${command}; nothing will be written${outDir ? ` (${outDir} is left as it was)` : ''}`,
    stopped: `${command} stopped by a signal before it finished; nothing was written${outDir ? ` (${outDir} was left as it was)` : ''}`,
  };
}

/**
 * Run `work` of `command` with stop handlers. Returns the work's exit code, or the stop's
 * when a signal came after the writes began.
 */
export async function withStopPoint(command: string, texts: StopTexts, work: (stop: StopPoint) => Promise<number | void>): Promise<number | void> {
  const uninstall = installStopHandlers(command, texts.stopping);
  try {
    const code = await work({
      beforeWriting: async () => {
        // Two turns: a signal that came during the work waits in the loop's poll phase, and
        // one setImmediate can run before that phase is reached again; the second runs after it.
        await yieldToEvents();
        await yieldToEvents();
        if (stopRequested()) throw new RunStopped(texts.stopped);
        setStoppingText('its output is being written; it finishes first, so nothing is half-written');
      },
    });
    // A signal that arrived during the writes is handled here (two turns, as above).
    await yieldToEvents();
    await yieldToEvents();
    if (!stopRequested()) return code;
    process.stderr.write(`mesofield: ${command} stopped by a signal after its output was complete\n`);
    return stopExitCode();
  } finally {
    uninstall();
  }
}

/**
 * The report a run draws after its results are written (`invert --report`, `train --report`),
 * on this thread in one stretch: a signal during it stops the run before the report's first
 * file (short-run-stop.ts), exit 130/143, and the results stay, complete, in an output the
 * command marks incomplete (its report is missing; `mesofield report DIR` draws it later).
 */
import { join } from 'node:path';

/** What a stopped report leaves behind, complete: invert's results or train's checkpoint. */
export type KeptOutput = 'the results' | 'the checkpoint';

/**
 * Draw DIR/report for `command`'s finished run in `outDir`. Returns the stop's exit code when a
 * signal came once the report's files were being written; throws RunStopped when one came before.
 */
export async function reportAfterRun(command: string, outDir: string, what: KeptOutput, quiet: boolean | undefined): Promise<number | void> {
  const are = what === 'the results' ? 'are' : 'is';
  const kept = `${what} in ${outDir} ${are} complete`;
  const { reportRunDirectoryWithStop } = await import('../reports/report-run-directory.js');
  const { withStopPoint } = await import('./short-run-stop.js');
  const texts = {
    stopping: `stopping before the report is written; ${kept}`,
    stopped: `${command} stopped by a signal before its report was written; ${kept} (the output is marked incomplete; write the report with: mesofield report ${outDir})`,
  };
  return withStopPoint(command, texts, async (stop) => {
    // Said once the stop handlers are in place: a Ctrl-C on seeing this line is always handled.
    if (!quiet) process.stderr.write(`${command}: drawing the report; Ctrl-C stops it before the report is written (${what} ${are} kept)\n`);
    const written = await reportRunDirectoryWithStop(outDir, join(outDir, 'report'), stop.beforeWriting);
    if (!quiet) process.stderr.write(`${command}: wrote ${written.join(', ')}\n`);
  });
}

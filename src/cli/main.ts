#!/usr/bin/env node
/**
 * mesofield command line: run-cli.ts does the work (commands load on demand); this file only
 * hands it the arguments and exits with its code. The last-resort handlers turn anything that
 * escapes (an error thrown from a callback) into the internal-error line, never a stack trace.
 *
 * `--version`, `schema KIND` and a well-formed `spinodal` are answered first by quick-answer.ts,
 * before commander, zod and the error machinery load: start-up is all they cost, and the text
 * is the same the full commands print. Everything else goes to run-cli.ts.
 */
const argv = process.argv.slice(2);
// A reader that closes stdout early (`| head -1`) ends the output quietly, not as an error (runtime/closed-pipe.ts).
const { tolerateClosedPipes } = await import('../runtime/closed-pipe.js');
tolerateClosedPipes();

/** Answer from quick-answer.ts if it can; false: the full command line answers. */
async function answeredQuickly(): Promise<boolean> {
  try {
    const { quickAnswer } = await import('./quick-answer.js');
    const text = await quickAnswer(argv);
    if (text === null) return false;
    process.stdout.write(text);
    return true;
  } catch {
    // Anything unusual (an unreadable package.json, a chain the RPA refuses) goes through the
    // full command line and its error handling; nothing was written yet.
    return false;
  }
}

if (!(await answeredQuickly())) {
  const { reportError } = await import('./run-command.js');
  const { runCli } = await import('./run-cli.js');
  const fatal = (e: unknown) => {
    process.exitCode = reportError(e);
    process.exit();
  };
  process.on('uncaughtException', fatal);
  process.on('unhandledRejection', fatal);
  const { code } = await runCli(argv);
  process.exitCode = code;
}

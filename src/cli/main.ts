#!/usr/bin/env node
/**
 * mesofield command line: run-cli.ts does the work (commands load on demand); this file only
 * hands it the arguments and exits with its code. The last-resort handlers turn anything that
 * escapes (an error thrown from a callback) into the internal-error line, never a stack trace.
 *
 * `mesofield --version` alone is answered here, before commander and the error machinery load:
 * it is what scripts call most often, and start-up is all it costs (the same line commander prints).
 */
const argv = process.argv.slice(2);
// A reader that closes stdout early (`| head -1`) ends the output quietly, not as an error (runtime/closed-pipe.ts).
const { tolerateClosedPipes } = await import('../runtime/closed-pipe.js');
tolerateClosedPipes();

async function versionOnly(): Promise<boolean> {
  if (argv.length !== 1 || (argv[0] !== '--version' && argv[0] !== '-V')) return false;
  try {
    const { mesofieldVersion } = await import('../io/versions.js');
    process.stdout.write(`${mesofieldVersion()}\n`);
    return true;
  } catch {
    // Anything unusual (an unreadable package.json) goes through the full command line and its error handling.
    return false;
  }
}

if (!(await versionOnly())) {
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

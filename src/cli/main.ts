#!/usr/bin/env node
/**
 * mesofield command line: run-cli.ts does the work (commands load on demand); this file only
 * hands it the arguments and exits with its code. The last-resort handlers turn anything that
 * escapes (an error thrown from a callback) into the internal-error line, never a stack trace.
 */
import { reportError } from './run-command.js';
import { runCli } from './run-cli.js';

const fatal = (e: unknown) => {
  process.exitCode = reportError(e);
  process.exit();
};
process.on('uncaughtException', fatal);
process.on('unhandledRejection', fatal);

const { code } = await runCli(process.argv.slice(2));
process.exitCode = code;

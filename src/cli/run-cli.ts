/**
 * The whole command line as a function: `runCli(argv)` parses, runs one command and returns
 * its exit code instead of exiting, so tests can run hundreds of invocations in one process
 * (the fault suite) and main.ts stays a two-line wrapper. With `capture`, what the command
 * writes to stdout/stderr is collected and returned instead of printed.
 */
import { Command, CommanderError } from 'commander';
import { mesofieldVersion } from '../io/versions.js';
import { setInvocation } from './cli-context.js';
import { registrations } from './command-specs.js';
import { EXIT } from './exit-codes.js';
import { reportError } from './run-command.js';

export interface CliResult {
  code: number;
  stdout: string;
  stderr: string;
}

async function buildProgram(args: readonly string[]): Promise<Command> {
  const program = new Command();
  program
    .name('mesofield')
    .description('Physics-informed networks for 1D polymer SCFT, checked against a spectral reference solver')
    .version(mesofieldVersion())
    .showHelpAfterError()
    .configureOutput({ writeOut: (s) => process.stdout.write(s), writeErr: (s) => process.stderr.write(s) })
    // commander's own usage errors (unknown option, missing argument) are bad input: exit 2.
    .exitOverride();
  for (const register of await registrations(args)) register(program);
  // Subcommands inherit the override: a usage error anywhere throws instead of exiting.
  for (const c of program.commands) c.exitOverride().configureOutput({ writeOut: (s) => process.stdout.write(s), writeErr: (s) => process.stderr.write(s) });
  return program;
}

/** Run one command line (without "node main.js"); returns the exit code of the contract. */
export async function runCli(argv: readonly string[], opts: { capture?: boolean } = {}): Promise<CliResult> {
  const debug = argv.includes('--debug');
  const args = argv.filter((a) => a !== '--debug');
  setInvocation(args, debug);
  let stdout = '';
  let stderr = '';
  const out = process.stdout.write;
  const err = process.stderr.write;
  if (opts.capture) {
    process.stdout.write = ((s: string | Uint8Array) => ((stdout += String(s)), true)) as typeof process.stdout.write;
    process.stderr.write = ((s: string | Uint8Array) => ((stderr += String(s)), true)) as typeof process.stderr.write;
  }
  const before = process.exitCode;
  process.exitCode = undefined;
  let code: number;
  try {
    const program = await buildProgram(args);
    await program.parseAsync([...args], { from: 'user' });
    code = Number(process.exitCode ?? EXIT.ok);
  } catch (e) {
    if (e instanceof CommanderError) code = e.exitCode === 0 ? EXIT.ok : EXIT.input;
    else code = reportError(e);
  } finally {
    if (opts.capture) {
      process.stdout.write = out;
      process.stderr.write = err;
    }
    process.exitCode = before;
  }
  return { code, stdout, stderr };
}

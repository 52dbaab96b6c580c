/**
 * What the current invocation was (its arguments and --debug), so an internal error can print
 * the command that reproduces it. Set once per run by run-cli.ts.
 */
let argv: readonly string[] = [];
let debug = false;

export function setInvocation(args: readonly string[], withDebug: boolean): void {
  argv = args;
  debug = withDebug;
}

export function invocation(): { argv: readonly string[]; debug: boolean } {
  return { argv, debug };
}

/** The command line as a user would type it again (arguments with spaces or quotes quoted). */
export function reproduceLine(): string {
  const quote = (a: string) => (/^[\w@%+=:,./-]+$/.test(a) ? a : `'${a.replace(/'/g, `'\\''`)}'`);
  return ['mesofield', ...argv.map(quote)].join(' ');
}

/**
 * Start-up: the calls scripts make most often and that need no parser library, answered
 * before commander, zod and the error machinery load (each costs tens of ms at every start;
 * docs/performance.md, "Start-up"): `--version`, `schema KIND` (the build's text of the
 * kind's JSON Schema) and a well-formed `spinodal`. Each answer is the same text the full
 * command prints, from the same function; any argument the quick reading does not accept
 * for certain (a bad value, an unknown flag, --help, --debug, a missing build text) gives
 * null, and the full command line answers with its own messages and exit codes.
 */

/** The stdout text of a successful run for these arguments, or null: let the full command line answer. */
export async function quickAnswer(argv: readonly string[]): Promise<string | null> {
  if (argv.length === 1 && (argv[0] === '--version' || argv[0] === '-V')) {
    const { mesofieldVersion } = await import('../io/versions.js');
    return `${mesofieldVersion()}\n`;
  }
  if (argv[0] === 'schema' && argv.length === 2) {
    const { CONFIG_SCHEMA_LOADERS } = await import('../io/schemas/config-schema-loaders.js');
    // An own property only, as the command checks: "constructor" or "toString" is no kind.
    if (!Object.hasOwn(CONFIG_SCHEMA_LOADERS, argv[1])) return null;
    const { builtSchemaText } = await import('../io/schemas/built-schema-text.js');
    return builtSchemaText(argv[1]);
  }
  if (argv[0] === 'spinodal') {
    const { quickSpinodalFlags } = await import('./spinodal-quick-flags.js');
    const flags = quickSpinodalFlags(argv.slice(1));
    if (flags === null) return null;
    const { spinodalAnswer } = await import('./spinodal-answer.js');
    return spinodalAnswer(flags.spec, flags.json);
  }
  return null;
}

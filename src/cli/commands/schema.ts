/**
 * `mesofield schema KIND`: the JSON Schema of a config file kind, generated from the zod
 * schema the tool itself validates with, so the reference cannot drift from the code.
 * Start-up: the build wrote each kind's text (io/schemas/config-json-schema.ts), so a kind is
 * printed from its file without zod; without the file only the asked kind's schema is built.
 * --markdown builds them all.
 */
import { readFileSync, statSync } from 'node:fs';
import type { Command } from 'commander';
import { InputError } from '../../io/errors.js';
import { BUILT_SCHEMA_FOLDER, CONFIG_KIND_NAMES, CONFIG_SCHEMA_LOADERS, loadConfigSchemas } from '../../io/schemas/config-schema-loaders.js';
import { action } from '../run-command.js';

/**
 * The build's text of a kind's JSON Schema (dist/config-schemas/KIND.json), or null without it.
 * A file older than the compiled schema list is stale (a plain tsc ran after the build, and tsc
 * rewrites every file it emits): then the schema is generated instead.
 */
export function builtSchemaText(kind: string, dist = new URL('../../', import.meta.url)): string | null {
  try {
    const file = new URL(`${BUILT_SCHEMA_FOLDER}/${kind}.json`, dist);
    const compiled = new URL('io/schemas/config-schema-loaders.js', dist);
    if (statSync(file).mtimeMs < statSync(compiled).mtimeMs) return null;
    return readFileSync(file, 'utf8');
  } catch {
    return null;
  }
}

export function registerSchema(program: Command): void {
  const kinds = CONFIG_KIND_NAMES.join(', ');
  program
    .command('schema')
    .description(`print the JSON Schema of a config file kind (${kinds}), with every field, default and bound`)
    .argument('[kind]', 'config kind')
    .option('--markdown', 'print the reference of every kind as Markdown tables (docs/config-reference.md)')
    .option('--synopsis', "print every command with its arguments and flags (the README's synopsis)")
    .action(
      action(async (kind: string | undefined, flags: { markdown?: boolean; synopsis?: boolean }, command: Command) => {
        if (flags.markdown) {
          const { configReferenceMarkdown } = await import('../../io/config-reference.js');
          process.stdout.write(configReferenceMarkdown(await loadConfigSchemas()));
          return;
        }
        if (flags.synopsis) {
          // run-cli registers every command for `schema --synopsis` (command-specs.ts), so the parent holds them all.
          const { synopsis } = await import('../synopsis.js');
          process.stdout.write(synopsis(command.parent!));
          return;
        }
        if (kind === undefined) throw new InputError(`kind: missing; allowed: ${kinds} (or --markdown)`);
        // An own property only: "constructor" or "toString" is no kind.
        if (!Object.hasOwn(CONFIG_SCHEMA_LOADERS, kind)) throw new InputError(`kind: got ${JSON.stringify(kind)}; allowed: ${kinds}`);
        process.stdout.write(builtSchemaText(kind) ?? (await (await import('../../io/schemas/config-json-schema.js')).configJsonSchemaText(kind)));
      }),
    );
}

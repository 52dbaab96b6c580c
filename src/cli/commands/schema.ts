/**
 * `mesofield schema KIND`: the JSON Schema of a config file kind, generated from the zod
 * schema the tool itself validates with, so the reference cannot drift from the code.
 * Start-up: the build wrote each kind's text (io/schemas/config-json-schema.ts), so a kind is
 * printed from its file without zod; without the file only the asked kind's schema is built.
 * --markdown builds them all. `schema KIND` alone is answered before commander loads (quick-answer.ts).
 */
import type { Command } from 'commander';
import { InputError } from '../../io/errors.js';
import { builtSchemaText } from '../../io/schemas/built-schema-text.js';
import { CONFIG_KIND_NAMES, CONFIG_SCHEMA_LOADERS, loadConfigSchemas } from '../../io/schemas/config-schema-loaders.js';
import { action } from '../run-command.js';

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

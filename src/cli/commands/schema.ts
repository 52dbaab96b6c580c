/**
 * `mesofield schema KIND`: the JSON Schema of a config file kind, generated from the zod
 * schema the tool itself validates with, so the reference cannot drift from the code.
 */
import type { Command } from 'commander';
import { z } from 'zod';
import { InputError } from '../../io/errors.js';
import { CONFIG_SCHEMAS } from '../../io/schemas/config-schemas.js';
import { action } from '../run-command.js';
import { configReferenceMarkdown } from '../../io/config-reference.js';

export function registerSchema(program: Command): void {
  const all = CONFIG_SCHEMAS;
  program
    .command('schema')
    .description(`print the JSON Schema of a config file kind (${Object.keys(all).join(', ')}), with every field, default and bound`)
    .argument('[kind]', 'config kind')
    .option('--markdown', 'print the reference of every kind as Markdown tables (docs/config-reference.md)')
    .option('--synopsis', "print every command with its arguments and flags (the README's synopsis)")
    .action(
      action(async (kind: string | undefined, flags: { markdown?: boolean; synopsis?: boolean }, command: Command) => {
        if (flags.markdown) {
          process.stdout.write(configReferenceMarkdown(all));
          return;
        }
        if (flags.synopsis) {
          // run-cli registers every command for `schema --synopsis` (command-specs.ts), so the parent holds them all.
          const { synopsis } = await import('../synopsis.js');
          process.stdout.write(synopsis(command.parent!));
          return;
        }
        if (kind === undefined) throw new InputError(`kind: missing; allowed: ${Object.keys(all).join(', ')} (or --markdown)`);
        const schema = all[kind];
        if (!schema) throw new InputError(`kind: got ${JSON.stringify(kind)}; allowed: ${Object.keys(all).join(', ')}`);
        process.stdout.write(`${JSON.stringify(z.toJSONSchema(schema, { io: 'input', unrepresentable: 'any' }), null, 2)}\n`);
      }),
    );
}

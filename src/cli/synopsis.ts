/**
 * The command synopsis of the README, generated from the commander program itself (every
 * command, its arguments and its options), so the README cannot drift from the flags.
 * `mesofield schema --synopsis` prints it; a test checks the README holds this text.
 */
import type { Command } from 'commander';

const WIDTH = 100;

function commandLine(c: Command): string {
  const args = c.registeredArguments.map((a) => (a.required ? `<${a.name()}>` : `[${a.name()}]`));
  const opts = c.options.filter((o) => o.long !== '--help').map((o) => `[${o.flags.replace(/^-\w, /, '')}]`);
  const head = `mesofield ${c.name()}`;
  const lines: string[] = [];
  let line = [head, ...args].join(' ');
  for (const o of opts) {
    if (line.length + 1 + o.length > WIDTH) {
      lines.push(line);
      line = `${' '.repeat(head.length)} ${o}`;
    } else line += ` ${o}`;
  }
  lines.push(line);
  return lines.join('\n');
}

export function synopsis(program: Command): string {
  return `${program.commands.map(commandLine).join('\n')}\n`;
}


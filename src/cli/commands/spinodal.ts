/**
 * `mesofield spinodal`: Leibler's RPA spinodal of a linear A/B block chain. Its common
 * well-formed calls are answered before commander and zod load (quick-answer.ts); everything
 * else, every error included, comes here.
 */
import type { Command } from 'commander';
import { parseOrThrow } from '../../io/errors.js';
import { chainSchema } from '../../physics/chain-schema.js';
import { action, numberFlag } from '../run-command.js';
import { spinodalAnswer } from '../spinodal-answer.js';

export function registerSpinodal(program: Command): void {
  program
    .command('spinodal')
    .description('RPA spinodal (χN)_s and q*·Rg of the disordered melt (Leibler 1980)')
    .option('--chain <type>', 'chain architecture: diblock | triblock', 'diblock')
    .option('--f <f>', 'A fraction of the chain', '0.5')
    .option('--first-block-share <t>', 'triblock: share of A in the first A block', '0.5')
    .option('--segment-ratio <r>', 'conformational asymmetry b_A/b_B (lengths in Rg of a chain of segment length b_B)', '1')
    .option('--json', 'print JSON on stdout')
    .option('--quiet', 'no messages on stderr (spinodal prints none; accepted like on every command)')
    .action(
      action((flags: { chain: string; f: string; firstBlockShare: string; segmentRatio: string; json?: boolean }) => {
        const raw: Record<string, unknown> = {
          type: flags.chain,
          f: numberFlag('--f', flags.f),
          segmentRatio: numberFlag('--segment-ratio', flags.segmentRatio),
        };
        if (flags.chain === 'triblock') raw.firstBlockShare = numberFlag('--first-block-share', flags.firstBlockShare);
        process.stdout.write(spinodalAnswer(parseOrThrow(chainSchema, raw, 'flags'), flags.json === true));
      }),
    );
}

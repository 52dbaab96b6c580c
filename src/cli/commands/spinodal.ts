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
import { SPINODAL_SWITCHES, SPINODAL_VALUED_FLAGS } from '../spinodal-flags.js';

export function registerSpinodal(program: Command): void {
  const command = program.command('spinodal').description('RPA spinodal (χN)_s and q*·Rg of the disordered melt (Leibler 1980)');
  for (const o of SPINODAL_VALUED_FLAGS) command.option(`${o.flag} ${o.placeholder}`, o.help, o.default);
  for (const o of SPINODAL_SWITCHES) command.option(o.flag, o.help);
  command.action(
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

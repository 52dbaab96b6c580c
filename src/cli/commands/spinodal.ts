/** `mesofield spinodal`: Leibler's RPA spinodal of a linear A/B block chain. */
import type { Command } from 'commander';
import { parseOrThrow } from '../../io/errors.js';
import { chainSchema } from '../../physics/chain-schema.js';
import { buildChain } from '../../physics/chain.js';
import { spinodal } from '../../physics/rpa.js';
import { action, numberFlag } from '../run-command.js';

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
        const spec = parseOrThrow(chainSchema, raw, 'flags');
        const chain = buildChain(spec);
        const sp = spinodal(chain);
        const out = { chain: chain.label, f: chain.speciesFraction.A, chiNSpinodal: sp.chiN, qStarRg: sp.qRg, period: sp.period };
        if (flags.json) process.stdout.write(`${JSON.stringify(out, null, 2)}\n`);
        else process.stdout.write(`chain ${out.chain}: (χN)_s = ${sp.chiN.toFixed(6)}, q*·Rg = ${sp.qRg.toFixed(6)}, period 2π/q* = ${sp.period.toFixed(6)} Rg\n`);
      }),
    );
}

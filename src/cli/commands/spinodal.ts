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
    .option('--preset <chain>', 'diblock | triblock', 'diblock')
    .option('--f <f>', 'A fraction of the chain', '0.5')
    .option('--share <t>', 'triblock: share of A in the first A block', '0.5')
    .option('--bA <b>', 'segment length of A relative to the reference', '1')
    .option('--bB <b>', 'segment length of B relative to the reference', '1')
    .option('--json', 'print JSON on stdout')
    .option('--quiet', 'no messages on stderr (spinodal prints none; accepted like on every command)')
    .action(
      action((flags: { preset: string; f: string; share: string; bA: string; bB: string; json?: boolean }) => {
        const raw: Record<string, unknown> = {
          type: flags.preset,
          f: numberFlag('--f', flags.f),
          segmentLengths: { A: numberFlag('--bA', flags.bA), B: numberFlag('--bB', flags.bB) },
        };
        if (flags.preset === 'triblock') raw.firstBlockShare = numberFlag('--share', flags.share);
        const spec = parseOrThrow(chainSchema, raw, 'flags');
        const chain = buildChain(spec);
        const sp = spinodal(chain);
        const out = { chain: chain.label, f: chain.speciesFraction.A, chiNSpinodal: sp.chiN, qStarRg: sp.qRg, periodRg: sp.period };
        if (flags.json) process.stdout.write(`${JSON.stringify(out, null, 2)}\n`);
        else process.stdout.write(`chain ${out.chain}: (χN)_s = ${sp.chiN.toFixed(6)}, q*·Rg = ${sp.qRg.toFixed(6)}, period 2π/q* = ${sp.period.toFixed(6)} Rg\n`);
      }),
    );
}

/** `mesofield fit-spacing`: χ and the segment length b from lamellar periods measured for several chain lengths. */
import type { Command } from 'commander';
import { readFileSync } from 'node:fs';
import { InputError } from '../../io/errors.js';
import { action, numberFlag } from '../run-command.js';

export function registerFitSpacing(program: Command): void {
  program
    .command('fit-spacing')
    .description("χ and the statistical segment length b from the lamellar period D measured for several N (same chemistry and temperature), through the reference's D(χN)")
    .argument('<file>', 'CSV: N, D_nm, and optionally dD_nm')
    .option('--f <f>', 'A fraction of the diblock (the same for every N)')
    .option('--segment-ratio <r>', 'b_A/b_B')
    .option('--chi-range <lo,hi>', 'χ search range (default: from 1.05 × the spinodal at the smallest N to χN = 60 at the largest)')
    .option('--nx <n>', 'model grid points per period', '64')
    .option('--ns <n>', 'model contour steps', '100')
    .option('--json', 'print the result JSON on stdout')
    .action(
      action(async (path: string, flags: { f?: string; segmentRatio?: string; chiRange?: string; nx: string; ns: string; json?: boolean }) => {
        const { parseSpacingCsv } = await import('../../inverse/spacing-csv.js');
        const { fitSpacingSeries } = await import('../../inverse/spacing-series.js');
        const { parseOrThrow, asInputError } = await import('../../io/errors.js');
        const { chainSchema } = await import('../../physics/chain-schema.js');
        const f = numberFlag('--f', flags.f);
        if (f === undefined) throw new InputError('--f: missing; the A fraction f of the diblock is required');
        const chain = parseOrThrow(chainSchema, { type: 'diblock', f, segmentRatio: numberFlag('--segment-ratio', flags.segmentRatio) ?? 1 }, 'flags');
        let chiRange: [number, number] | undefined;
        if (flags.chiRange !== undefined) {
          const r = flags.chiRange.split(',').map(Number);
          if (r.length !== 2 || r.some((v) => !Number.isFinite(v)) || !(r[0] > 0 && r[0] < r[1])) throw new InputError(`--chi-range: got ${JSON.stringify(flags.chiRange)}; allowed: two numbers lo,hi with 0 < lo < hi`);
          chiRange = [r[0], r[1]];
        }
        const nx = numberFlag('--nx', flags.nx)!;
        const ns = numberFlag('--ns', flags.ns)!;
        if (!(Number.isInteger(nx) && nx >= 16 && (nx & (nx - 1)) === 0)) throw new InputError(`--nx: got ${flags.nx}; allowed: a power of two ≥ 16`);
        if (!(Number.isInteger(ns) && ns >= 20 && ns % 2 === 0)) throw new InputError(`--ns: got ${flags.ns}; allowed: an even whole number ≥ 20`);
        let text: string;
        try {
          text = readFileSync(path, 'utf8');
        } catch (e) {
          throw new InputError(`${path}: cannot read the file (${(e as NodeJS.ErrnoException).code ?? String(e)})`);
        }
        let fit;
        try {
          fit = fitSpacingSeries(parseSpacingCsv(text, path), { chain, nx, ns, chiRange });
        } catch (e) {
          throw asInputError(e, 'flags');
        }
        if (flags.json) {
          process.stdout.write(`${JSON.stringify({ kind: 'spacing-fit', file: path, chain, ...fit }, null, 2)}\n`);
          return;
        }
        const i68 = fit.intervals['68.3%'];
        const i95 = fit.intervals['95%'];
        const lines = [
          `χ = ${fit.chi.toPrecision(5)}   68.3 % [${i68.chi[0].toPrecision(5)}, ${i68.chi[1].toPrecision(5)}]   95 % [${i95.chi[0].toPrecision(5)}, ${i95.chi[1].toPrecision(5)}]   (profile likelihood)`,
          `b = ${fit.b.toPrecision(5)} nm   68.3 % [${i68.b[0].toPrecision(5)}, ${i68.b[1].toPrecision(5)}]   95 % [${i95.b[0].toPrecision(5)}, ${i95.b[1].toPrecision(5)}]`,
          `χ² = ${fit.chi2.toPrecision(4)} for ${fit.dof} dof, ${fit.seconds.toFixed(1)} s`,
          '    N     χN      D model (nm)',
          ...fit.model.map((m) => `${String(m.N).padStart(5)}  ${m.chiN.toPrecision(4).padEnd(7)} ${m.D.toPrecision(5)}`),
          ...fit.notes.map((n) => `note: ${n}`),
        ];
        process.stdout.write(`${lines.join('\n')}\n`);
      }),
    );
}

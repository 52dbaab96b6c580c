/** `mesofield bragg-pattern`: the Bragg peaks of a solved or fitted lamella (a solution file). */
import type { Command } from 'commander';
import { claimOut, withOutput } from '../run-output.js';
import { join } from 'node:path';
import { InputError } from '../../io/errors.js';
import { action, numberFlag } from '../run-command.js';

interface PatternFlags {
  overwrite?: boolean;
  orders: string;
  report?: boolean;
  lorentz?: boolean;
  width?: string;
  rgNm?: string;
  json?: boolean;
  out?: string;
}


export function registerBragg(program: Command): void {
  program
    .command('bragg-pattern')
    .description('Bragg peak positions q_n = 2πn/D and relative intensities of a lamella (a solution file from solve or invert)')
    .argument('<solution>', 'solution.json of a periodic lamella')
    .option('--orders <n>', 'number of orders', '6')
    .option('--lorentz', 'apply the powder Lorentz factor 1/q²')
    .option('--width <w>', 'peak standard deviation for the drawn pattern (1/Rg, or nm⁻¹ with --rg-nm); default 4 % of q_1 = 2π/D')
    .option('--rg-nm <R>', 'Rg in nm: q in nm⁻¹')
    .option('--json', 'print JSON on stdout')
    .option('--out <dir>', 'write peaks.csv and pattern.csv into this directory')
    .option('--overwrite', 'replace a previous bragg-pattern output in --out (only the files mesofield wrote there)')
    .option('--report', 'also draw the pattern into <out>/report (PDF/PNG; needs --out)')
    .action(
      action(async (solution: string, flags: PatternFlags) => {
        const { lamellaFromSolutionFile } = await import('../../inverse/bragg/bragg-inputs.js');
        const { braggPeaks, patternCurve } = await import('../../inverse/bragg/bragg-pattern.js');
        if (flags.report && !flags.out) throw new InputError('--report: needs --out DIR (the report is written into DIR/report)');
        const orders = numberFlag('--orders', flags.orders)!;
        if (!(Number.isInteger(orders) && orders >= 1 && orders <= 32)) throw new InputError(`--orders: got ${flags.orders}; allowed: a whole number from 1 to 32`);
        const rg = numberFlag('--rg-nm', flags.rgNm);
        if (rg !== undefined && !(rg > 0)) throw new InputError(`--rg-nm: got ${flags.rgNm}; allowed: Rg in nm, a number > 0`);
        const lam = lamellaFromSolutionFile(solution);
        if (orders >= lam.phiA.modes / lam.periods) throw new InputError(`--orders: got ${orders}; the solution's grid resolves orders below ${Math.floor(lam.phiA.modes / lam.periods)}`);
        const p = braggPeaks(lam.phiA, lam.periods, orders, Boolean(flags.lorentz));
        const toUnit = rg ? 1 / rg : 1;
        const unit = rg ? 'nm⁻¹' : '1/Rg';
        const width = numberFlag('--width', flags.width) ?? ((2 * Math.PI) / p.period) * 0.04 * toUnit;
        if (!(width > 0)) throw new InputError(`--width: got ${flags.width}; allowed: a peak standard deviation > 0`);
        const peaks = p.peaks.map((k) => ({ order: k.order, q: k.q * toUnit, relative: k.relative }));
        const curve = patternCurve({ ...p, peaks: p.peaks.map((k) => ({ ...k, q: k.q * toUnit })) }, width, peaks[peaks.length - 1].q * 1.15);
        const result = { kind: 'bragg-pattern', solution, chiN: lam.chiN, period: p.period, ...(rg ? { periodNm: p.period * rg } : {}), qUnit: unit, lorentz: p.lorentz, width, peaks };
        // --out claimed (io/output-directory.ts); the pattern is cheap, so it is claimed when the result is ready.
        const claimed = claimOut(flags, 'bragg-pattern');
        return withOutput(claimed, async () => {
          if (flags.out) {
            claimed!.write({
              'peaks.csv': `order,q,relative\n${peaks.map((k) => `${k.order},${k.q},${k.relative}`).join('\n')}\n`,
              'pattern.csv': `q,I\n${curve.q.map((q, i) => `${q},${curve.I[i]}`).join('\n')}\n`,
              'result.json': `${JSON.stringify(result, null, 1)}\n`,
            });
            if (flags.report) {
              const { buildReport } = await import('../../reports/build-report.js');
              const { renderReport, writeReportFiles } = await import('../../reports/write-report.js');
              const { provenance } = await import('../../io/versions.js');
              const periodText = rg ? `${(p.period * rg).toPrecision(5)} nm (${p.period.toPrecision(5)} Rg)` : `${p.period.toPrecision(5)} Rg`;
              const info = {
                kind: 'bragg-pattern',
                source: flags.out,
                system: lam.system,
                period: p.period,
                ...(rg ? { rgNm: rg } : {}),
                settings: [`solution: ${solution}`, `orders: ${orders}`, `Lorentz factor: ${p.lorentz ? 'yes' : 'no'}`, `peak width: ${width} ${unit}`].map((line) => ({ name: line.slice(0, line.indexOf(':')), value: line.slice(line.indexOf(':') + 2) })),
                provenance: { ...provenance() },
              };
              const bragg = { qLabel: rg ? 'q / nm⁻¹' : 'q Rg', chiN: lam.chiN, periodText, lorentz: p.lorentz, width, peaks, curve };
              const written = writeReportFiles(join(flags.out, 'report'), renderReport(buildReport({ info, bragg }), ['pdf', 'png'], 150));
              process.stderr.write(`bragg-pattern: wrote ${written.join(', ')}\n`);
            }
          }
          if (flags.json) process.stdout.write(`${JSON.stringify(result, null, 2)}\n`);
          else {
            const lines = [`lamella at χN = ${lam.chiN}: period D = ${rg ? `${(p.period * rg).toPrecision(6)} nm (${p.period.toPrecision(6)} Rg)` : `${p.period.toPrecision(6)} Rg`}${p.lorentz ? ', powder Lorentz factor 1/q² applied' : ''}`];
            lines.push(`order  q (${unit})   I_n/I_1`);
            for (const k of peaks) lines.push(`${String(k.order).padStart(5)}  ${k.q.toPrecision(6).padEnd(11)} ${k.relative.toExponential(4)}`);
            process.stdout.write(`${lines.join('\n')}\n`);
          }
        });
      }),
    );
}

/** `mesofield synth`: a synthetic noisy composition profile from the reference lamella, with its truth. */
import { formatText } from '../../io/formats/file-format.js';
import { SYNTH_TRUTH_VERSION, synthTruthSchema } from '../../io/formats/synth-truth.js';
import type { SynthTruth } from '../../io/formats/synth-truth.js';
import type { Command } from 'commander';
import { SYNTH_PROFILE, SYNTH_TRUTH } from '../../io/synth-output.js';
import { claimOut, withOutput } from '../run-output.js';
import { nothingWritten, withStopPoint } from '../short-run-stop.js';
import { asInputError } from '../../io/errors.js';
import { provenance } from '../../io/versions.js';
import { synthCsv, synthesize } from '../../inverse/synth.js';
import { action, numberFlag, requiredFlag } from '../run-command.js';
import type { SynthFilmFlags } from './synth-film.js';

/** The flags of `synth --film` and the two of the periodic profile only. */
interface SynthFlags extends SynthFilmFlags {
  periods: string;
  period: string;
}

export function registerSynth(program: Command): void {
  program
    .command('synth')
    .description('write a synthetic noisy profile (CSV x,phiA[,sigma]) from the reference lamella, and its true parameters in FILE.truth.json')
    .option('--f <f>', 'A fraction of the diblock')
    .option('--chiN <x>', 'χN of the lamella')
    .option('--points <n>', 'sample points', '64')
    .option('--noise <sigma>', 'standard deviation of the Gaussian noise on φA', '0')
    .option('--seed <s>', 'noise seed (integer; equal seeds repeat exactly)', '1')
    .option('--periods <p>', 'periods covered by the profile (need not be whole)', '1')
    .option('--offset <x0>', 'data position of the centre of an A-rich domain, Rg (film: of the bottom wall, in the units of --film)', '0')
    .option('--period <L|equilibrium>', 'period in Rg, or the stress-free period', 'equilibrium')
    .option('--resolution <W>', 'Gaussian instrument resolution (standard deviation), Rg (film: in the units of --film)', '0')
    .option('--nx <n>', 'model grid points per period (power of two)', '64')
    .option('--ns <n>', 'model contour steps', '100')
    .option('--rg-nm <R>', 'write x in nm with Rg = R nm (bulk: the other length flags stay in Rg; film: --film, --offset, --resolution are in nm too)')
    .option('--out <dir>', `write ${SYNTH_PROFILE} and its truth ${SYNTH_TRUTH} into this directory (default: CSV on stdout)`)
    .option('--overwrite', 'replace a previous synth output in --out (only the files mesofield wrote there)')
    .option('--quiet', 'no messages on stderr')
    .option('--film <H>', 'a film of thickness H between walls instead of a bulk lamella, in the units of the data (nm with --rg-nm, else Rg), as invert --film reads it')
    .option('--affinity <b,t>', 'film: wall affinities for A, bottom and top, kT per chain × Rg', '0,0')
    .option('--measure <kind>', 'film: phi (composition depth profile) | sld (SLD depth profile) | reflectivity (Q,R,dR)', 'phi')
    .option('--sld <a,b,sub,med>', 'film: SLDs of A, B, the substrate and the medium, 10⁻⁶ Å⁻² (sld, reflectivity)')
    .option('--dq-over-q <r>', 'film reflectivity: Gaussian Q resolution, FWHM relative to Q', '0.05')
    .option('--q-range <lo,hi>', 'film reflectivity: Q range in Å⁻¹', '0.008,0.2')
    .option('--wall-range <l>', "film: range of the walls' surface field, Rg", '0.25')
    .action(
      action(async (flags: SynthFlags) => {
        if (flags.film !== undefined) {
          const { synthFilmCommand } = await import('./synth-film.js');
          return synthFilmCommand(flags);
        }
        const f = requiredFlag('--f', numberFlag('--f', flags.f), (v) => v > 0 && v < 1, 'the A fraction, 0 < f < 1');
        const chiN = requiredFlag('--chiN', numberFlag('--chiN', flags.chiN), (v) => v > 0 && v <= 500, 'a number in (0, 500]');
        const points = requiredFlag('--points', numberFlag('--points', flags.points), (v) => Number.isInteger(v) && v >= 2 && v <= 1_000_000, 'an integer ≥ 2');
        const noise = requiredFlag('--noise', numberFlag('--noise', flags.noise), (v) => v >= 0 && v < 1, 'a standard deviation in [0, 1)');
        const seed = requiredFlag('--seed', numberFlag('--seed', flags.seed), (v) => Number.isInteger(v) && v >= 0 && v <= 0xffffffff, 'an integer in [0, 4294967295]');
        const periods = requiredFlag('--periods', numberFlag('--periods', flags.periods), (v) => v > 0 && v <= 1000, 'a number of periods > 0');
        const offset = requiredFlag('--offset', numberFlag('--offset', flags.offset), Number.isFinite, 'a position in Rg');
        const period = flags.period === 'equilibrium' ? 'equilibrium' : requiredFlag('--period', numberFlag('--period', flags.period), (v) => v > 0 && v <= 200, 'a period in Rg in (0, 200], or "equilibrium"');
        const resolution = requiredFlag('--resolution', numberFlag('--resolution', flags.resolution), (v) => v >= 0, 'a standard deviation ≥ 0 in Rg');
        const nx = requiredFlag('--nx', numberFlag('--nx', flags.nx), Number.isInteger, 'a power of two');
        const ns = requiredFlag('--ns', numberFlag('--ns', flags.ns), Number.isInteger, 'an even integer');
        const rgNm = flags.rgNm === undefined ? undefined : requiredFlag('--rg-nm', numberFlag('--rg-nm', flags.rgNm), (v) => v > 0, 'Rg in nm, a number > 0');
        const chain = { type: 'diblock' as const, f, segmentRatio: 1 };
        const out = claimOut(flags, 'synth');
        // The solve runs on this thread in one stretch: a signal stops the run before it writes (short-run-stop.ts).
        return withStopPoint('synth', nothingWritten('synth', flags.out), (stop) =>
          withOutput(out, async () => {
            if (!flags.quiet) process.stderr.write(`synth: solving the lamella (f = ${f}, χN = ${chiN}, ${nx} × ${ns}${period === 'equilibrium' ? ', stress-free period' : ''}); Ctrl-C stops it before anything is written\n`);
            let profile;
            try {
              profile = synthesize({ chain, chiN, points, noise, seed, periods, offset, period, resolution, nx, ns });
            } catch (e) {
              throw asInputError(e, 'flags');
            }
            const csv = synthCsv(profile, noise, rgNm ?? 1);
            await stop.beforeWriting();
            if (!out) {
              process.stdout.write(csv);
              return;
            }
            const truth: SynthTruth = {
              kind: 'synth-truth',
              version: SYNTH_TRUTH_VERSION,
              provenance: provenance(),
              chain,
              f,
              chiN,
              period: profile.period,
              periodMode: period === 'equilibrium' ? 'equilibrium' : 'given',
              offset,
              points,
              periods,
              noise,
              seed,
              resolution,
              nx,
              ns,
              xUnits: rgNm ? 'nm' : 'Rg',
              ...(rgNm ? { rgNm } : {}),
              freeEnergy: profile.point.solution.freeEnergy,
              note: 'lengths (period, offset, resolution) in Rg; offset is the data position of the centre of an A-rich domain',
            };
            const written = out.write({ [SYNTH_PROFILE]: csv, [SYNTH_TRUTH]: formatText(synthTruthSchema, truth) });
            if (!flags.quiet) process.stderr.write(`synth: wrote ${written.join(' and ')} (χN = ${chiN}, period ${profile.period.toPrecision(7)} Rg)\n`);
          }),
        );
      }),
    );
}

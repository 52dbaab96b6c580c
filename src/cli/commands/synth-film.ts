/**
 * `synth --film`: a synthetic film measurement (φA or SLD depth profile, or R(Q)) and its truth.
 * Lengths (--film, --offset, --resolution) are in the units of the data it writes, as
 * `invert --film` and `reflectivity` read them: nm with --rg-nm (Rg = R nm), else Rg.
 * --wall-range is a parameter of the model and stays in Rg everywhere.
 */
import { InputError, asInputError } from '../../io/errors.js';
import { formatText } from '../../io/formats/file-format.js';
import { filmSynthTruthSchema } from '../../io/formats/film.js';
import { provenance } from '../../io/versions.js';
import { filmSynthFiles, synthesizeFilm } from '../../inverse/film/film-synth.js';
import type { FilmSynthSettings } from '../../inverse/film/film-synth.js';
import { numberFlag, requiredFlag } from '../run-command.js';
import { SYNTH_PROFILE, SYNTH_TRUTH } from '../../io/synth-output.js';
import { claimOut, withOutput } from '../run-output.js';
import { nothingWritten, withStopPoint } from '../short-run-stop.js';
import { numberList, sldFlag } from './film-flags.js';

export interface SynthFilmFlags {
  f?: string;
  chiN?: string;
  film?: string;
  affinity?: string;
  measure?: string;
  sld?: string;
  dqOverQ?: string;
  qRange?: string;
  wallRange?: string;
  points: string;
  noise: string;
  seed: string;
  offset: string;
  resolution: string;
  nx: string;
  ns: string;
  rgNm?: string;
  out?: string;
  overwrite?: boolean;
  quiet?: boolean;
}

export async function synthFilmCommand(flags: SynthFilmFlags): Promise<number | void> {
  const kinds = ['phi', 'sld', 'reflectivity'] as const;
  const kind = kinds.find((k) => k === flags.measure);
  if (!kind) throw new InputError(`--measure: got ${JSON.stringify(flags.measure)}; allowed: phi, sld, reflectivity`);
  const f = requiredFlag('--f', numberFlag('--f', flags.f), (v) => v > 0 && v < 1, 'the A fraction, 0 < f < 1');
  const chiN = requiredFlag('--chiN', numberFlag('--chiN', flags.chiN), (v) => v > 0 && v <= 200, 'a number in (0, 200]');
  // Lengths in the data's units (one convention with invert --film and reflectivity): nm with --rg-nm, else Rg.
  const rgNm = flags.rgNm === undefined ? undefined : requiredFlag('--rg-nm', numberFlag('--rg-nm', flags.rgNm), (v) => v > 0 && v < 1000, 'Rg in nm, a number > 0');
  const unit = rgNm === undefined ? 'Rg' : 'nm';
  const scale = rgNm ?? 1;
  const thickness = requiredFlag('--film', numberFlag('--film', flags.film), (v) => v > 0 && v / scale <= 500, `a thickness in ${unit}, in (0, ${500 * scale}]`) / scale;
  const [bottom, top] = numberList('--affinity', flags.affinity, 2, '1,-0.5 (bottom, top)')!;
  const points = requiredFlag('--points', numberFlag('--points', flags.points), (v) => Number.isInteger(v) && v >= 2 && v <= 1_000_000, 'an integer ≥ 2');
  const noise = requiredFlag('--noise', numberFlag('--noise', flags.noise), (v) => v >= 0 && v < 1, kind === 'reflectivity' ? 'the relative error of R, in (0, 1)' : kind === 'sld' ? 'the SLD noise in 10⁻⁶ Å⁻², in [0, 1)' : 'a standard deviation of φA in [0, 1)');
  if (kind === 'reflectivity' && !(noise > 0)) throw new InputError('--noise: got 0; a reflectivity curve needs its relative error dR/R > 0 (e.g. 0.05): a fit weighs each point by dR');
  const seed = requiredFlag('--seed', numberFlag('--seed', flags.seed), (v) => Number.isInteger(v) && v >= 0 && v <= 0xffffffff, 'an integer in [0, 4294967295]');
  const offset = requiredFlag('--offset', numberFlag('--offset', flags.offset), Number.isFinite, `a position in ${unit}`) / scale;
  const width = requiredFlag('--resolution', numberFlag('--resolution', flags.resolution), (v) => v >= 0 && v / scale < thickness / 4, `an interface width in ${unit}, ≥ 0 and below a quarter of the thickness`) / scale;
  const nx = requiredFlag('--nx', numberFlag('--nx', flags.nx), (v) => Number.isInteger(v) && v >= 8 && (v & (v - 1)) === 0, 'a power of two ≥ 8');
  const ns = requiredFlag('--ns', numberFlag('--ns', flags.ns), (v) => Number.isInteger(v) && v >= 4, 'an integer ≥ 4');
  const wallRange = requiredFlag('--wall-range', numberFlag('--wall-range', flags.wallRange), (v) => v > 0 && v <= 5, 'a range in Rg, in (0, 5]');
  const sld = sldFlag(flags.sld);
  if (kind !== 'phi' && !sld) throw new InputError(`--sld: missing; --measure ${kind} needs the SLDs of A, B, the substrate and the medium in 10⁻⁶ Å⁻² (e.g. 6.0,1.0,2.07,0)`);
  if (kind === 'reflectivity' && rgNm === undefined) throw new InputError('--rg-nm: missing; --measure reflectivity needs Rg in nm (Q is in Å⁻¹)');
  const dq = requiredFlag('--dq-over-q', numberFlag('--dq-over-q', flags.dqOverQ), (v) => v >= 0 && v <= 0.5, 'the FWHM of the Q resolution relative to Q, in [0, 0.5]');
  const qRange = numberList('--q-range', flags.qRange, 2, '0.008,0.2 (Å⁻¹)') as [number, number];
  if (!(qRange[0] > 0 && qRange[1] > qRange[0])) throw new InputError(`--q-range: got ${flags.qRange}; allowed: 0 < lo < hi, in Å⁻¹`);
  const S = 1e-6;
  const settings: FilmSynthSettings = {
    kind,
    chain: { type: 'diblock', f, segmentRatio: 1 },
    chiN,
    bottom,
    top,
    thickness,
    wallRange,
    width,
    offset,
    points,
    noise: kind === 'sld' ? noise * S : noise,
    seed,
    qRange,
    instrument: { slds: sld && { A: sld.A * S, B: sld.B * S, substrate: sld.substrate * S, medium: sld.medium * S }, rgNm, dQoverQ: dq },
    nx,
    ns,
  };
  const out = claimOut(flags, 'synth');
  // The film solve runs on this thread in one stretch: a signal stops the run before it writes (short-run-stop.ts).
  return withStopPoint('synth', nothingWritten('synth', flags.out), (stop) =>
    withOutput(out, async () => {
      if (!flags.quiet) process.stderr.write(`synth: solving the film (χN = ${chiN}, ${nx} × ${ns}); Ctrl-C stops it before anything is written\n`);
      let files;
      try {
        const d = synthesizeFilm(settings);
        files = filmSynthFiles(settings, d, rgNm);
      } catch (e) {
        throw asInputError(e, 'flags');
      }
      await stop.beforeWriting();
      if (!out) {
        process.stdout.write(files.csv);
        return;
      }
      const written = out.write({ [SYNTH_PROFILE]: files.csv, [SYNTH_TRUTH]: formatText(filmSynthTruthSchema, { ...files.truth, provenance: provenance() }) });
      if (!flags.quiet) process.stderr.write(`synth: wrote ${written.join(' and ')} (film ${+(thickness * scale).toPrecision(6)} ${unit}${rgNm ? ` = ${+thickness.toPrecision(6)} Rg` : ''}, χN = ${chiN}, layers ${files.truth.layers})\n`);
    }),
  );
}

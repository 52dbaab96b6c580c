/**
 * Where `synth --out DIR` puts its files, and how `invert` finds the truth of a synthetic
 * profile: DIR/profile.csv and DIR/truth.json, inside a directory marked as synth's output.
 * (Older runs wrote PROFILE.truth.json beside the CSV; that name is still read.)
 */
import { existsSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { OUTPUT_MARKER } from './output-directory.js';

export const SYNTH_PROFILE = 'profile.csv';
export const SYNTH_TRUTH = 'truth.json';

/** The truth file of a synthetic profile, or undefined for a measured one. */
export function synthTruthPath(profilePath: string): string | undefined {
  const dir = dirname(profilePath);
  const inSynthDir = basename(profilePath) === SYNTH_PROFILE && existsSync(join(dir, OUTPUT_MARKER)) && existsSync(join(dir, SYNTH_TRUTH));
  if (inSynthDir) return join(dir, SYNTH_TRUTH);
  const legacy = `${profilePath}.truth.json`;
  return existsSync(legacy) ? legacy : undefined;
}

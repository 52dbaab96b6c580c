/**
 * A `fit-scattering` run as its config says: read each file, fit it, fit χ(T) when the
 * files carry temperatures, and build the result. The CLI calls this; tests may too.
 */
import { resolve } from 'node:path';
import { InputError } from '../../io/errors.js';
import { readInputText } from '../../io/fs-errors.js';
import type { ScatteringConfig } from '../../io/schemas/scattering-config.js';
import type { ScatteringResultFile } from '../../io/formats/scattering-fit.js';
import type { Provenance } from '../../io/versions.js';
import type { ScatteringData } from './scattering-csv.js';
import { parseScatteringCsv } from './scattering-csv.js';
import type { RgSetting, ScatteringFit } from './scattering-fit.js';
import { fitScatteringSeries } from './scattering-series.js';
import { scatteringResult } from './scattering-result.js';

export interface ScatteringRunOptions {
  /** Directory that relative paths of config.files are resolved against. */
  baseDir: string;
  /** Where the Rg settings came from (flags or the config path), for messages. */
  rgSource: string;
  provenance: Provenance;
  onFit?: (i: number, total: number, fit: ScatteringFit) => void;
}

/** Rg in nm and how it enters the fit, from the units block. */
export function rgSetting(u: ScatteringConfig['units'], source: string): RgSetting {
  if (u.rgNm !== undefined && u.segmentLengthNm !== undefined) throw new InputError(`${source}: give Rg either as rgNm (--rg-nm) or as segments with segmentLengthNm (--segments, --segment-length-nm), not both`);
  const rg = u.rgNm ?? (u.segmentLengthNm !== undefined && u.segments !== undefined ? u.segmentLengthNm * Math.sqrt(u.segments / 6) : undefined);
  if (u.segmentLengthNm !== undefined && u.segments === undefined) throw new InputError(`${source}: segmentLengthNm (--segment-length-nm) needs segments (--segments N) as well: Rg = b·sqrt(N/6)`);
  if (rg === undefined) {
    if (u.rgNmSd !== undefined) throw new InputError(`${source}: rgNmSd (--rg-nm-sd) = ${u.rgNmSd} needs an Rg to be uncertain about: give rgNm (--rg-nm)`);
    return { mode: 'free' };
  }
  return u.rgNmSd !== undefined ? { mode: 'constrained', value: rg, sd: u.rgNmSd } : { mode: 'fixed', value: rg };
}

export function runScatteringFit(config: ScatteringConfig, o: ScatteringRunOptions): { result: ScatteringResultFile; datas: ScatteringData[] } {
  const t0 = performance.now();
  const datas = config.files.map((f) => {
    return parseScatteringCsv(readInputText(resolve(o.baseDir, f.file), f.file), f.file);
  });
  const units = new Set(datas.map((d) => d.qUnit));
  if (units.size > 1) throw new InputError(`files: the q columns mix units (${[...units].join(', ')}); the resolution is in the files' q units, so give all files in one unit`);
  const toPerNm = datas[0].toPerNm;
  const r = fitScatteringSeries(
    datas.map((data, i) => ({ data, temperature: config.files[i].temperature })),
    {
      chain: config.system.chain,
      rg: rgSetting(config.units, o.rgSource),
      resolution: config.resolution * toPerNm,
      chiNRange: config.chiNRange as [number, number] | undefined,
      rgSource: '--rg-nm',
      profilePoints: config.profilePoints,
      segments: config.units.segments,
      nbar: config.nbar,
    },
    (i, fit) => o.onFit?.(i, datas.length, fit),
  );
  return { result: scatteringResult(datas, config, o.provenance, r, (performance.now() - t0) / 1000), datas };
}

/**
 * A `bragg-pattern` run as its settings say: the lamella of a solution file, its Bragg peaks
 * (bragg-pattern.ts) and the drawn pattern, as the value of the result file
 * (io/formats/bragg-pattern.ts) and the curve of pattern.csv. Units: q in 1/Rg, or in nm⁻¹
 * when rgNm (Rg in nm) is given; the width is a standard deviation in that unit. The CLI and
 * the tests call this one function.
 */
import { BRAGG_PATTERN_VERSION, braggPatternFileSchema } from '../../io/formats/bragg-pattern.js';
import type { BraggPatternCurve, BraggPatternFile } from '../../io/formats/bragg-pattern.js';
import { throughSchema } from '../../io/formats/file-format.js';
import { InputError } from '../../io/errors.js';
import type { Provenance } from '../../io/versions.js';
import { lamellaFromSolutionFile } from './bragg-inputs.js';
import { braggPeaks, patternCurve } from './bragg-pattern.js';

export const MAX_ORDERS = 32;

export interface BraggPatternSettings {
  /** The solution file (solve or invert output) of a periodic lamella. */
  solution: string;
  orders: number;
  lorentz: boolean;
  /** Peak standard deviation of the drawn pattern in q's unit; default 4 % of q_1 = 2π/D. */
  width?: number;
  rgNm?: number;
}

/** Where each setting came from (a flag), named in messages. */
const SOURCE = { orders: '--orders', width: '--width', rgNm: '--rg-nm' };

export function runBraggPattern(s: BraggPatternSettings, provenance: Provenance): { result: BraggPatternFile; curve: BraggPatternCurve } {
  if (!(Number.isInteger(s.orders) && s.orders >= 1 && s.orders <= MAX_ORDERS)) throw new InputError(`${SOURCE.orders}: got ${s.orders}; allowed: a whole number from 1 to ${MAX_ORDERS}`);
  const rg = s.rgNm;
  if (rg !== undefined && !(rg > 0)) throw new InputError(`${SOURCE.rgNm}: got ${rg}; allowed: Rg in nm, a number > 0`);
  if (s.width !== undefined && !(s.width > 0)) throw new InputError(`${SOURCE.width}: got ${s.width}; allowed: a peak standard deviation > 0`);
  const lam = lamellaFromSolutionFile(s.solution);
  const resolved = Math.floor(lam.phiA.modes / lam.periods);
  if (s.orders >= lam.phiA.modes / lam.periods) throw new InputError(`${SOURCE.orders}: got ${s.orders}; the solution's grid resolves orders below ${resolved}`);
  const p = braggPeaks(lam.phiA, lam.periods, s.orders, s.lorentz);
  const toUnit = rg ? 1 / rg : 1;
  const width = s.width ?? ((2 * Math.PI) / p.period) * 0.04 * toUnit;
  const peaks = p.peaks.map((k) => ({ order: k.order, q: k.q * toUnit, relative: k.relative }));
  const curve = patternCurve({ ...p, peaks: p.peaks.map((k) => ({ ...k, q: k.q * toUnit })) }, width, peaks[peaks.length - 1].q * 1.15);
  const result = throughSchema(braggPatternFileSchema, {
    kind: 'bragg-pattern',
    version: BRAGG_PATTERN_VERSION,
    provenance,
    solution: s.solution,
    system: lam.system,
    chiN: lam.chiN,
    period: p.period,
    ...(rg ? { rgNm: rg, periodNm: p.period * rg } : {}),
    qUnit: rg ? 'nm⁻¹' : '1/Rg',
    orders: s.orders,
    lorentz: p.lorentz,
    width,
    peaks,
  });
  return { result, curve };
}

/**
 * A temperature series of disordered-melt scattering curves: one RPA fit per file
 * (scattering-fit.ts), then χ(T) through the fitted χN (temperature-series.ts). A file
 * that cannot be fitted (an ordered peak, χN at the spinodal) stops the series with its
 * temperature named: a χ(T) line through the remaining points would hide that the melt
 * ordered there.
 */
import { InputError } from '../../io/errors.js';
import { buildChain } from '../../physics/chain.js';
import type { ScatteringData } from './scattering-csv.js';
import type { ScatteringFit, ScatteringFitSettings } from './scattering-fit.js';
import { fitScattering } from './scattering-fit.js';
import type { TemperatureSeriesFit } from './temperature-series.js';
import { fitTemperatureSeries } from './temperature-series.js';

export interface SeriesInput {
  data: ScatteringData;
  /** Kelvin. */
  temperature?: number;
}

export interface ScatteringSeriesResult {
  fits: (ScatteringFit & { temperature?: number; seconds: number })[];
  series?: TemperatureSeriesFit;
  seriesSeconds?: number;
}

export function fitScatteringSeries(
  inputs: SeriesInput[],
  settings: ScatteringFitSettings & { segments?: number; nbar?: number },
  onFit?: (i: number, fit: ScatteringFit) => void,
): ScatteringSeriesResult {
  const fits: ScatteringSeriesResult['fits'] = [];
  inputs.forEach((inp, i) => {
    let fit: ScatteringFit;
    try {
      fit = fitScattering(inp.data, settings);
    } catch (e) {
      if (e instanceof InputError && inp.temperature !== undefined) throw new InputError(`at T = ${inp.temperature} K: ${e.message}`);
      throw e;
    }
    fits.push({ ...fit, temperature: inp.temperature });
    onFit?.(i, fit);
  });
  const withT = inputs.filter((x) => x.temperature !== undefined).length;
  if (withT === 0) return { fits };
  if (withT !== inputs.length) throw new InputError('temperature series: give a temperature for every file or for none');
  const t0 = performance.now();
  const chain = buildChain(settings.chain);
  const spec = settings.chain;
  const symmetricDiblock = spec.type === 'diblock' && Math.abs(spec.f - 0.5) < 1e-12 && spec.segmentRatio === 1;
  const series = fitTemperatureSeries(
    fits.map((f) => ({ temperature: f.temperature!, chiN: f.chiN, interval: f.interval, source: f.source })),
    {
      chiNTransition: fits[0].chiNSpinodal,
      transitionLabel: symmetricDiblock
        ? 'mean-field order–disorder transition (the RPA critical point of the symmetric diblock, Leibler 1980)'
        : `mean-field spinodal of the disordered melt (${chain.label}); the mean-field ODT lies slightly before it and may be into a phase this 1D model does not compute`,
      segments: settings.segments,
      nbar: settings.nbar,
      symmetricDiblock,
    },
  );
  return { fits, series, seriesSeconds: (performance.now() - t0) / 1000 };
}

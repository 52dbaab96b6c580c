/**
 * The classical estimate together with what it owes to the assumed inputs (assumed-inputs.ts):
 * the uncertain ones profiled into the interval, and, without an Rg uncertainty, the
 * sensitivity to Rg whenever x is in nm and the period is tied to the equilibrium period.
 * Rg with the equilibrium period is profiled exactly (rg-profile.ts).
 */
import type { AssumedInput, AssumedInputsReport } from './assumed-inputs.js';
import { assessAssumedInputs, refitter } from './assumed-inputs.js';
import type { ClassicalEstimate, ClassicalSettings } from './classical.js';
import { createModels, estimateClassical } from './classical.js';
import { checkLengthScale } from './length-scale-check.js';
import { exactRgProfile } from './rg-profile.js';
import type { ProfileData } from './profile-csv.js';

export interface ClassicalWithInputs {
  estimate: ClassicalEstimate;
  assumed: AssumedInputsReport;
}

export function estimateWithAssumedInputs(data: ProfileData, settings: ClassicalSettings, inputs: AssumedInput[], onRefit?: (label: string) => void): ClassicalWithInputs {
  checkLengthScale(data, settings.chain, settings.chiNRange?.[1] ?? 60);
  const models = createModels(settings);
  const estimate = estimateClassical(data, settings, models);
  const t0 = performance.now();
  const hasRgSd = inputs.some((i) => i.key === 'rgNm');
  const tied = data.units.x === 'nm' && settings.period.mode === 'equilibrium' && !hasRgSd;
  const refit = refitter(data, { ...settings, onEvaluation: undefined }, models, onRefit);
  // Rg with the equilibrium period: profiled exactly (cheap: Rg only rescales x). Otherwise
  // (and for f, the segment ratio) in the local quadratic approximation.
  const rgInput = inputs.find((i) => i.key === 'rgNm');
  let rgProfile;
  if (rgInput && settings.period.mode === 'equilibrium') {
    const e = exactRgProfile(data, settings, models, estimate, rgInput.value, rgInput.sd);
    rgProfile = { source: rgInput.source, value: rgInput.value, sd: rgInput.sd, rgNmAtBest: e.rgNm, chiN: e.chiN, intervals: e.intervals };
  }
  const others = rgProfile ? inputs.filter((i) => i.key !== 'rgNm') : inputs;
  const assumed = assessAssumedInputs(estimate, others, refit, { sensitivityRg: tied ? data.units.rgNm : undefined, rgProfile });
  // The refits and the Rg profile, beside the base fit's own time.
  assumed.seconds = (performance.now() - t0) / 1000;
  return { estimate, assumed };
}

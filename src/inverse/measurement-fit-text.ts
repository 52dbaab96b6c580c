/** The text summaries of `fit-bragg`, `fit-spacing` and `bragg-pattern` on stdout, from their result files (numbers by io/number-format.ts). */
import type { BraggPatternFile } from '../io/formats/bragg-pattern.js';
import type { BraggFitFile, SpacingFitFile } from '../io/formats/measurement-fits.js';
import { formatNumber as fmt } from '../io/number-format.js';

const bound = (limited: boolean) => (limited ? ' (range bound)' : '');

export function braggFitText(r: BraggFitFile): string {
  const i68 = r.intervals['68.3%'];
  const i95 = r.intervals['95%'];
  const lines = [
    `χN = ${fmt(r.chiN, 5)}   68.3 % [${fmt(i68.lo, 5)}${bound(i68.limitedByRange.lo)}, ${fmt(i68.hi, 5)}${bound(i68.limitedByRange.hi)}]   95 % [${fmt(i95.lo, 5)}${bound(i95.limitedByRange.lo)}, ${fmt(i95.hi, 5)}${bound(i95.limitedByRange.hi)}]   (profile likelihood${r.rgTie ? ' over the intensities and D tied to Rg' : ' over the relative intensities'})`,
    `D = ${fmt(r.periodNm, 6)} ± ${fmt(r.periodNmSd, 2)} nm from the peak positions; the mean-field period at this χN is ${fmt(r.period, 5)} Rg, so Rg = ${fmt(r.impliedRgNm, 4)} nm`,
  ];
  if (r.rgTie) lines.push(`tied to Rg = ${fmt(r.rgTie.rgNm)}${r.rgTie.rgNmSd !== null ? ` ± ${fmt(r.rgTie.rgNmSd)}` : ''} nm: model D = ${fmt(r.rgTie.periodModelNm, 5)} nm, (D − model)/σ = ${fmt(r.rgTie.pull, 3)}`);
  lines.push(`χ² = ${fmt(r.chi2, 4)} for ${r.dof} dof, ${r.evaluations} model evaluations, ${fmt(r.seconds, 3)} s`);
  lines.push('order  q (nm⁻¹)    I measured   I model      (I − model)/dI');
  for (const p of r.peaks) lines.push(`${String(p.order).padStart(5)}  ${fmt(p.q, 5).padEnd(10)}  ${fmt(p.I, 5).padEnd(11)}  ${fmt(p.model, 5).padEnd(11)}  ${fmt(p.normalisedResidual, 3)}`);
  lines.push(...r.assumptions.map((a) => `assumes: ${a}`));
  lines.push(...r.notes.map((n) => `note: ${n}`));
  return `${lines.join('\n')}\n`;
}

export function spacingFitText(r: SpacingFitFile): string {
  const i68 = r.intervals['68.3%'];
  const i95 = r.intervals['95%'];
  const lines = [
    `χ = ${fmt(r.chi, 5)}   68.3 % [${fmt(i68.chi[0], 5)}, ${fmt(i68.chi[1], 5)}]   95 % [${fmt(i95.chi[0], 5)}, ${fmt(i95.chi[1], 5)}]   (profile likelihood)`,
    `b = ${fmt(r.b, 5)} nm   68.3 % [${fmt(i68.b[0], 5)}, ${fmt(i68.b[1], 5)}]   95 % [${fmt(i95.b[0], 5)}, ${fmt(i95.b[1], 5)}]`,
    `χ² = ${fmt(r.chi2, 4)} for ${r.dof} dof${r.sigma.source === 'estimated' ? ` (σ of D estimated from the scatter: ${fmt(r.sigma.value, 3)} nm)` : ''}, ${r.evaluations} χ values, ${fmt(r.seconds, 3)} s`,
    '    N     χN      D (nm)     D model (nm)',
    ...r.points.map((p) => `${String(p.N).padStart(5)}  ${fmt(p.chiN, 4).padEnd(7)} ${fmt(p.D, 5).padEnd(10)} ${fmt(p.model, 5)}`),
    ...r.assumptions.map((a) => `assumes: ${a}`),
    ...r.notes.map((n) => `note: ${n}`),
  ];
  return `${lines.join('\n')}\n`;
}

export function braggPatternText(r: BraggPatternFile): string {
  const period = r.periodNm !== undefined ? `${r.periodNm.toPrecision(6)} nm (${r.period.toPrecision(6)} Rg)` : `${r.period.toPrecision(6)} Rg`;
  const lines = [`lamella at χN = ${r.chiN}: period D = ${period}${r.lorentz ? ', powder Lorentz factor 1/q² applied' : ''}`];
  lines.push(`order  q (${r.qUnit})   I_n/I_1`);
  for (const k of r.peaks) lines.push(`${String(k.order).padStart(5)}  ${k.q.toPrecision(6).padEnd(11)} ${k.relative === null ? 'undefined' : k.relative.toExponential(4)}`);
  return `${lines.join('\n')}\n`;
}

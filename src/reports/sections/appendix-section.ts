/**
 * Appendix: the model's assumptions (the caution about a fitted χN only where a χN was
 * fitted) and every setting of the run in a compact two-pair-per-row table.
 */
import type { Block, ReportPage } from '../document.js';
import type { ReportInput } from '../report-inputs.js';
import type { ReportSection } from './section.js';
import { modelAssumptions } from '../../physics/model-assumptions.js';

/** The model's assumptions from the one list (physics/model-assumptions.ts), as sentences. */
function assumptions(input: ReportInput): string[] {
  const fitted = input.inversion !== undefined || input.braggFit !== undefined || input.spacingFit !== undefined || input.info.kind === 'invert';
  return modelAssumptions(input.film || input.sweep?.film ? 'film' : 'periodic', fitted).map((a) => `${a[0].toUpperCase()}${a.slice(1)}.`);
}

export function appendixPage(input: ReportInput): ReportPage {
  const s = input.info.settings;
  const half = Math.ceil(s.length / 2);
  const rows = Array.from({ length: half }, (_, i) => [s[i].name, s[i].value, s[i + half]?.name ?? '', s[i + half]?.value ?? '']);
  const blocks: Block[] = [
    { type: 'text', lines: ['Model assumptions'], style: 'heading' },
    { type: 'text', lines: assumptions(input).map((a) => `• ${a}`) },
  ];
  if (s.length) blocks.push({ type: 'text', lines: ['Settings as run'], style: 'heading' }, { type: 'table', header: ['setting', 'value', 'setting', 'value'], widths: [2.6, 1.9, 2.6, 1.9], rows });
  return { heading: 'Appendix: assumptions and settings', blocks, flow: true };
}

export const appendixSection: ReportSection = { id: 'appendix', pages: (input: ReportInput) => [appendixPage(input)] };

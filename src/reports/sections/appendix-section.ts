/**
 * Appendix: the model's assumptions (the caution about a fitted χN only where a χN was
 * fitted) and every setting of the run in a compact two-pair-per-row table.
 */
import type { Block, ReportPage } from '../document.js';
import type { ReportInput } from '../report-inputs.js';
import type { ReportSection } from './section.js';

export const ASSUMPTIONS = [
  'Mean-field theory: composition fluctuations are neglected, so the order–disorder transition and the behaviour near it are the mean-field ones.',
  'Incompressible melt: φA + φB = 1 at every point; the pressure-like field only enforces this.',
  'Gaussian (continuous, flexible) chains with one statistical segment length per species; no finite extensibility, no chain stiffness.',
];
const ONE_D = 'One-dimensional lamellae in a periodic cell, compared with the disordered melt only: other morphologies (cylinders, gyroid, spheres) are not considered and may be more stable.';
const FILM = 'A film between flat walls, composition varying across the film only (one dimension); the walls act through short-range surface fields of the stated affinity and range.';
const FITTED =
  'A χN fitted to data inherits these assumptions and the assumed f and segment lengths: it is the value that makes this model reproduce the data, not a model-free measurement of χ; fluctuation corrections in particular shift the apparent χN near the transition.';

function assumptions(input: ReportInput): string[] {
  return [...ASSUMPTIONS, input.film ? FILM : ONE_D, ...(input.inversion || input.info.kind === 'invert' ? [FITTED] : [])];
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

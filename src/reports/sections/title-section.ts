/** Page 1: what was run, its headline results (with units), with what and how long. Settings go to the appendix. */
import type { ReportPage } from '../document.js';
import { duration, sig } from '../format.js';
import type { ReportInput, RunInfo } from '../report-inputs.js';
import { chainLine, keyResults } from './key-results.js';
import type { ReportSection } from './section.js';

function provenanceLines(info: RunInfo): string[] {
  const p = info.provenance;
  const backend = p.backend ? `network backend ${p.backend}${p.tfjs ? `, tfjs ${p.tfjs}` : ''}` : 'spectral reference solver (float64)';
  return [
    `Made by mesofield ${p.version} on Node ${p.node}; ${backend}.`,
    `Run date: ${p.createdAt} (from the run's provenance).`,
    `Run time: ${info.runSeconds !== undefined ? duration(info.runSeconds) : 'not recorded'}${info.runSecondsNote ? ` (${info.runSecondsNote})` : ' (wall time of the whole run)'}.`,
  ];
}

export const titleSection: ReportSection = {
  id: 'title',
  pages(input: ReportInput): ReportPage[] {
    const { info } = input;
    const results = keyResults(input);
    const system = [`Chain: ${chainLine(input)}.`];
    if (info.system.externalField) system.push(`External fields: ${JSON.stringify(info.system.externalField)}`);
    if (info.rgNm !== undefined) system.push(`Rg = ${sig(info.rgNm, 4)} nm (lengths in nm are Rg × ${sig(info.rgNm, 4)}).`);
    return [
      {
        heading: `mesofield ${info.kind} report`,
        blocks: [
          { type: 'text', lines: [`Run directory: ${info.source}`], style: 'small' },
          { type: 'text', lines: ['System'], style: 'heading' },
          { type: 'text', lines: system },
          ...(results.length
            ? [
                { type: 'text' as const, lines: ['Results'], style: 'heading' as const },
                { type: 'table' as const, header: ['quantity', 'value', 'unit'], widths: [3.2, 5.2, 1.4], rows: results.map((r) => [r.name, r.value, r.unit ?? '']) },
              ]
            : []),
          ...(input.inversion?.restsOn?.length
            ? [
                { type: 'text' as const, lines: ['What this χN rests on'], style: 'heading' as const },
                { type: 'text' as const, lines: input.inversion.restsOn.map((l) => `• ${l}`) },
              ]
            : []),
          { type: 'text', lines: ['Provenance'], style: 'heading' },
          { type: 'text', lines: provenanceLines(info) },
          {
            type: 'text',
            style: 'small',
            lines: ['Units: lengths in Rg of the whole chain (nm where Rg in nm is known), contour s from 0 to 1, fields w in kT, free energies F in kT per chain. The settings as run and the model assumptions are in the appendix.'],
          },
        ],
      },
    ];
  },
};

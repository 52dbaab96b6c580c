/** Page 1: what was run (system, config), with what (versions, backend), when and how long. */
import { buildChain } from '../../physics/chain.js';
import type { ReportPage } from '../document.js';
import { sig } from '../format.js';
import type { ReportInput, RunInfo } from '../report-inputs.js';
import type { ReportSection } from './section.js';

export function systemLines(info: RunInfo): string[] {
  const chain = buildChain(info.system.chain);
  const lines = [
    `Chain: ${chain.label} (${info.system.chain.type}), A fraction f = ${sig(chain.speciesFraction.A, 4)}`,
    `χN = ${sig(info.system.chiN, 6)}`,
  ];
  if (Number.isFinite(info.period)) {
    const nm = info.rgNm !== undefined ? ` = ${sig(info.period * info.rgNm, 4)} nm (with Rg = ${sig(info.rgNm, 4)} nm)` : ' (give --rg-nm to also print it in nm)';
    lines.push(`Lamellar period L = ${sig(info.period, 6)} Rg${nm}`);
  } else lines.push('Lamellar period: none (no ordered lamella at these parameters)');
  if (info.system.externalField) lines.push(`External fields: ${JSON.stringify(info.system.externalField)}`);
  return lines;
}

function provenanceLines(info: RunInfo): string[] {
  const p = info.provenance;
  const backend = p.backend ? `network backend ${p.backend}${p.tfjs ? `, tfjs ${p.tfjs}` : ''}` : 'spectral reference solver (float64), no network backend';
  return [
    `Made by mesofield ${p.version} on Node ${p.node}; ${backend}`,
    `Run date: ${p.createdAt} (from the run's provenance)`,
    `Run time: ${info.runSeconds !== undefined ? `${sig(info.runSeconds, 3)} s` : 'not recorded'}${info.runSecondsNote ? ` (${info.runSecondsNote})` : ''}`,
  ];
}

export const titleSection: ReportSection = {
  id: 'title',
  pages(input: ReportInput): ReportPage[] {
    const { info } = input;
    return [
      {
        heading: `mesofield ${info.kind} report`,
        blocks: [
          { type: 'text', lines: [`Run directory: ${info.source}`], style: 'small' },
          { type: 'text', lines: ['System'], style: 'heading' },
          { type: 'text', lines: systemLines(info) },
          { type: 'text', lines: ['Provenance'], style: 'heading' },
          { type: 'text', lines: provenanceLines(info) },
          { type: 'text', lines: ['Configuration as run'], style: 'heading' },
          { type: 'text', lines: info.config.length ? info.config : ['(no configuration recorded in the run)'], style: 'mono' },
          {
            type: 'text',
            style: 'small',
            lines: ['Units: lengths in Rg of the whole chain, contour s from 0 to 1, fields w in kT, free energies F in kT per chain.'],
          },
        ],
      },
    ];
  },
};

/** Last page: the numbers behind the figures, and the model's assumptions (physics/model-assumptions.ts). */
import { buildChain } from '../../physics/chain.js';
import type { ScftSolution } from '../../physics/result.js';
import type { ReportPage } from '../document.js';
import { sci, sig } from '../format.js';
import type { MetricRow, ReportInput } from '../report-inputs.js';
import { difference, exchangeField, maxAbs, relativeL2 } from '../solution-differences.js';
import type { ReportSection } from './section.js';
import { modelAssumptions } from '../../physics/model-assumptions.js';

function solutionRows(sol: ScftSolution, who: string): MetricRow[] {
  const excess = Number.isFinite(sol.freeEnergyDisordered) ? sol.freeEnergy - sol.freeEnergyDisordered : undefined;
  return [
    { name: `${who}: phase`, value: sol.phase },
    { name: `${who}: free energy F`, value: sig(sol.freeEnergy, 10), unit: 'kT per chain' },
    { name: `${who}: F − F_disordered`, value: excess === undefined ? 'n/a' : sci(excess, 6), unit: 'kT per chain' },
    { name: `${who}: Q (from q) / Q (from q†)`, value: `${sig(sol.Q, 10)} / ${sig(sol.QDagger, 10)}` },
    { name: `${who}: order parameter max φA − min φA`, value: sig(sol.amplitude, 6) },
    { name: `${who}: iterations, final residual`, value: `${sol.iterations}, ${sci(sol.residual)}`, unit: 'kT' },
    { name: `${who}: converged`, value: sol.converged ? 'yes' : 'NO' },
    { name: `${who}: grid nx × contour ns`, value: `${sol.nx} × ${sol.ns}` },
  ];
}

function comparisonRows(ref: ScftSolution, net: ScftSolution, label: string): MetricRow[] {
  return [
    { name: `${label} vs reference: relative L2 error of φA`, value: sci(relativeL2(net.phi.A, ref.phi.A)) },
    { name: `${label} vs reference: max |ΔφA|`, value: sci(maxAbs(difference(net.phi.A, ref.phi.A))) },
    { name: `${label} vs reference: max |Δ(wA − wB)|`, value: sci(maxAbs(difference(exchangeField(net), exchangeField(ref)))), unit: 'kT' },
    { name: `${label} vs reference: F difference`, value: sci(net.freeEnergy - ref.freeEnergy), unit: 'kT per chain' },
  ];
}


function metricsPage(input: ReportInput): ReportPage {
  const rows: MetricRow[] = [];
  const ref = input.profiles?.reference ?? input.propagators?.reference;
  if (ref) rows.push(...solutionRows(ref, 'reference'));
  const net = input.profiles?.network;
  const label = input.profiles?.networkLabel ?? 'network';
  if (ref && net) rows.push(...solutionRows(net, label), ...comparisonRows(ref, net, label));
  if (input.info.system) {
    const chain = buildChain(input.info.system.chain);
    rows.unshift({ name: 'chain, f, χN', value: `${chain.label}, ${sig(chain.speciesFraction.A, 4)}, ${sig(input.info.system.chiN, 6)}` });
  }
  rows.push(...(input.metrics ?? []));
  return {
    heading: 'Metrics and model assumptions',
    blocks: [
      { type: 'table', header: ['quantity', 'value', 'unit'], widths: [4.2, 3.2, 1.4], rows: rows.map((r) => [r.name, r.value, r.unit ?? '']) },
      { type: 'text', lines: ['Model assumptions'], style: 'heading' },
      { type: 'text', lines: modelAssumptions(ref?.cell.kind ?? 'periodic', true).map((a) => `• ${a[0].toUpperCase()}${a.slice(1)}.`) },
    ],
  };
}

export const metricsSection: ReportSection = { id: 'metrics', pages: (input: ReportInput) => [metricsPage(input)] };

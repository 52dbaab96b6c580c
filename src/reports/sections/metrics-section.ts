/**
 * The numbers behind the figures, each with its unit and a sensible number of digits: the
 * reference solution (spectral solver's own convergence figures only), the network's errors
 * against it, and the fit's quality for inverse runs.
 */
import type { ScftSolution } from '../../physics/result.js';
import type { ReportPage } from '../document.js';
import { sci, sig } from '../format.js';
import type { MetricRow, NetworkMetricsInput, ReportInput } from '../report-inputs.js';
import { compareSolutions } from '../../physics/solution-metrics.js';
import { periodText, phaseText } from './key-results.js';
import type { ReportSection } from './section.js';

function solutionRows(sol: ScftSolution, who: string, rgNm: number | undefined, periodTolerance?: number): MetricRow[] {
  const rows: MetricRow[] = [{ name: `${who}: phase`, value: phaseText(sol.phase) }];
  if (Number.isFinite(sol.period)) rows.push({ name: `${who}: period L`, value: `${periodText(sol.period, rgNm, 6)}${periodTolerance !== undefined ? ` ± ${sci(periodTolerance, 1)} Rg` : ''}` });
  rows.push({ name: `${who}: free energy F`, value: sig(sol.freeEnergy, 8), unit: 'kT per chain' });
  if (Number.isFinite(sol.freeEnergyDisordered) && sol.phase !== 'disordered') {
    rows.push({ name: `${who}: F of the disordered melt`, value: sig(sol.freeEnergyDisordered, 8), unit: 'kT per chain' });
    rows.push({ name: `${who}: F − F_disordered`, value: sig(sol.freeEnergy - sol.freeEnergyDisordered, 6), unit: 'kT per chain' });
  }
  rows.push({ name: `${who}: Q from q, from q†`, value: `${sig(sol.Q, 8)}, ${sig(sol.QDagger, 8)}`, unit: '–' });
  rows.push({ name: `${who}: order parameter max φA − min φA`, value: sig(sol.amplitude, 5), unit: '–' });
  if (sol.solver === 'spectral') {
    rows.push({ name: `${who}: iterations of the final solve`, value: String(sol.iterations) });
    rows.push({ name: `${who}: largest field change in the last iteration`, value: sci(sol.residual), unit: 'kT' });
    rows.push({ name: `${who}: converged`, value: sol.converged ? 'yes' : 'NO' });
  }
  rows.push({ name: `${who}: grid points × contour steps`, value: `${sol.nx} × ${sol.ns}` });
  return rows;
}

/** Two solutions on one grid, measured by the one comparison of the physics layer (physics/solution-metrics.ts). */
function comparisonRows(ref: ScftSolution, net: ScftSolution, label: string): MetricRow[] {
  const m = compareSolutions(net, ref);
  return [
    { name: `${label} vs reference: φA relative L2 error`, value: sci(m.phiA.relativeL2), unit: '–' },
    { name: `${label} vs reference: max |ΔφA|`, value: sci(m.phiA.maxError), unit: '–' },
    { name: `${label} vs reference: max |Δ(wA − wB)|`, value: sci(m.exchangeField.maxError), unit: 'kT' },
    { name: `${label} vs reference: F difference`, value: sci(m.freeEnergyError), unit: 'kT per chain' },
  ];
}

/** A train run's own measurements (its metrics file), at the evaluation grid of the run. */
function networkRows(m: NetworkMetricsInput): MetricRow[] {
  return [
    { name: 'network: density verdict', value: phaseText(m.phase) },
    { name: 'network vs reference: φA relative L2 error (max)', value: `${sci(m.phiA.relativeL2)} (${sci(m.phiA.maxError)})`, unit: '–' },
    { name: 'network vs reference: wA − wB relative L2 error (max)', value: `${sci(m.exchangeField.relativeL2)} (${sci(m.exchangeField.maxError)} kT)`, unit: '–' },
    { name: 'network vs reference: Q relative error', value: sci(m.QRelativeError), unit: '–' },
    { name: 'network vs reference: F difference', value: sci(m.freeEnergyError), unit: 'kT per chain' },
    ...Object.entries(m.freshResiduals).map(([k, v]) => ({ name: `network: mean squared ${k} residual at 1024 fresh points`, value: sci(v), unit: '–' })),
  ];
}

function metricsPage(input: ReportInput): ReportPage | null {
  const rows: MetricRow[] = [];
  const rgNm = input.info.rgNm;
  const ref = input.film?.solution ?? input.profiles?.reference ?? input.propagators?.reference;
  if (ref) rows.push(...solutionRows(ref, 'reference', rgNm, input.periodSearch?.periodTolerance));
  const net = input.profiles?.network;
  const label = input.profiles?.networkLabel ?? 'network';
  if (input.networkMetrics) rows.push(...networkRows(input.networkMetrics));
  else if (ref && net) rows.push(...solutionRows(net, label, rgNm), ...comparisonRows(ref, net, label));
  if (input.inversion?.fitRows) rows.push(...input.inversion.fitRows.map((r) => ({ ...r, name: `fit: ${r.name}` })));
  rows.push(...(input.metrics ?? []));
  if (!rows.length) return null;
  return {
    heading: 'Metrics',
    flow: true,
    blocks: [{ type: 'table', header: ['quantity', 'value', 'unit'], widths: [4.4, 3.6, 1.3], rows: rows.map((r) => [r.name, r.value, r.unit ?? '']) }],
  };
}

export const metricsSection: ReportSection = {
  id: 'metrics',
  pages: (input: ReportInput) => {
    const p = metricsPage(input);
    return p ? [p] : [];
  },
};

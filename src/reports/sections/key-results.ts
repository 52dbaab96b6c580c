/**
 * The headline numbers of a run for the title page, each with its unit and a sensible number
 * of digits: what a reader should take away before turning the page.
 */
import { buildChain } from '../../physics/chain.js';
import type { ScftSolution } from '../../physics/result.js';
import { sci, sig } from '../format.js';
import type { MetricRow, NetworkMetricsInput, ReportInput } from '../report-inputs.js';
import { sweepSeries } from './sweep-analysis.js';

/** "lamellar" says more than a 1D cell knows: it compared lamellae with disorder only. */
export function phaseText(phase: string): string {
  return phase === 'lamellar' ? 'lamellar (compared with the disordered melt only)' : phase;
}

export function periodText(period: number, rgNm: number | undefined, digits = 5): string {
  return rgNm !== undefined ? `${sig(period * rgNm, digits)} nm (${sig(period, digits)} Rg)` : `${sig(period, digits)} Rg`;
}

function solutionRows(sol: ScftSolution, rgNm: number | undefined, periodTolerance?: number): MetricRow[] {
  const rows: MetricRow[] = [{ name: 'phase', value: phaseText(sol.phase) }];
  if (Number.isFinite(sol.period)) rows.push({ name: 'lamellar period L', value: `${periodText(sol.period, rgNm, 5)}${periodTolerance !== undefined ? ` ± ${sci(periodTolerance, 1)} Rg` : ''}` });
  rows.push({ name: 'free energy F', value: sig(sol.freeEnergy, 7), unit: 'kT per chain' });
  if (Number.isFinite(sol.freeEnergyDisordered) && sol.phase !== 'disordered') rows.push({ name: 'F − F of the disordered melt', value: sig(sol.freeEnergy - sol.freeEnergyDisordered, 5), unit: 'kT per chain' });
  return rows;
}

function trainingRow(t: NonNullable<ReportInput['training']>): MetricRow {
  return { name: 'training phases', value: t.phases.map((p) => `${p.name} ${p.iterations}`).join(', ') + ' iterations' };
}

/** The network's error against the reference and its density verdict (a train run's metrics file), and the phases run. */
function networkRows(net: NetworkMetricsInput, input: ReportInput): MetricRow[] {
  const rows: MetricRow[] = [
    { name: 'network φA error, relative L2 (max)', value: `${sci(net.phiA.relativeL2)} (${sci(net.phiA.maxError)})`, unit: '–' },
    { name: 'network F − reference F', value: sci(net.freeEnergyError), unit: 'kT per chain' },
    { name: 'network density', value: phaseText(net.phase) },
  ];
  // How the network's F was formed (the F error above depends on it: Q corrected by the MDE residual or read off q(x, 1)).
  if (net.notes?.length) rows.push({ name: 'network solution evaluated', value: net.notes.join('; ') });
  if (input.training?.phases.length) rows.push(trainingRow(input.training));
  return rows;
}

export function keyResults(input: ReportInput): MetricRow[] {
  const rgNm = input.info.rgNm;
  const rows: MetricRow[] = [];
  const inv = input.inversion;
  if (inv) {
    const i95 = inv.interval95 ? `; 95 %: ${sig(inv.interval95.lower, 5)} – ${sig(inv.interval95.upper, 5)}` : '';
    rows.push({ name: 'fitted χN (profile-likelihood intervals)', value: `${sig(inv.bestChiN, 5)}; ${Math.round(inv.interval.level * 100)} %: ${sig(inv.interval.lower, 5)} – ${sig(inv.interval.upper, 5)}${i95}`, unit: '–' });
    rows.push(...(inv.fitRows ?? []));
    return rows;
  }
  const bf = input.braggFit;
  if (bf) {
    const [a, b] = [bf.intervals['68.3%'], bf.intervals['95%']];
    const open = (i: typeof a) => (i.limitedByRange.hi ? ' (open: range bound)' : '');
    rows.push({ name: 'fitted χN (profile-likelihood intervals)', value: `${sig(bf.chiN, 5)}; 68 %: ${sig(a.lo, 5)} – ${sig(a.hi, 5)}${open(a)}; 95 %: ${sig(b.lo, 5)} – ${sig(b.hi, 5)}${open(b)}`, unit: '–' });
    rows.push({ name: 'period D from the peak positions', value: `${sig(bf.periodNm, 5)} ± ${sig(bf.periodNmSd, 2)}`, unit: 'nm' });
    rows.push(bf.rgTie ? { name: 'Rg the period is tied to', value: `${sig(bf.rgTie.rgNm, 4)}${bf.rgTie.rgNmSd !== null ? ` ± ${sig(bf.rgTie.rgNmSd, 2)}` : ' (exact)'}`, unit: 'nm' } : { name: 'Rg implied by D at this χN', value: sig(bf.impliedRgNm, 4), unit: 'nm' });
    rows.push({ name: 'χ² / degrees of freedom', value: `${sig(bf.chi2, 4)} / ${bf.dof}` });
    return rows;
  }
  const sf = input.spacingFit;
  if (sf) {
    const [a, b] = [sf.intervals['68.3%'], sf.intervals['95%']];
    rows.push({ name: 'fitted χ per reference segment', value: `${sig(sf.chi, 5)}; 68 %: ${sig(a.chi[0], 5)} – ${sig(a.chi[1], 5)}; 95 %: ${sig(b.chi[0], 5)} – ${sig(b.chi[1], 5)}`, unit: '–' });
    rows.push({ name: 'segment length b', value: `${sig(sf.b, 5)}; 68 %: ${sig(a.b[0], 5)} – ${sig(a.b[1], 5)}; 95 %: ${sig(b.b[0], 5)} – ${sig(b.b[1], 5)}`, unit: 'nm' });
    rows.push({ name: 'χN of the samples', value: sf.points.map((p) => `${sig(p.chiN, 4)} (N = ${p.N})`).join(', ') });
    rows.push({ name: 'χ² / degrees of freedom', value: `${sig(sf.chi2, 4)} / ${sf.dof}` });
    return rows;
  }
  if (input.sweep?.film) {
    rows.push({ name: 'points solved', value: `${input.sweep.points.length} (${input.sweep.points.filter((p) => p.converged).length} converged)` });
    for (const s of input.sweep.film.scans) {
      const tag = input.sweep.film.scans.length > 1 ? ` (χN = ${sig(s.chiN, 4)}, walls ${sig(s.walls.bottom, 3)} / ${sig(s.walls.top, 3)})` : '';
      if (s.bulkPeriod > 0) rows.push({ name: `bulk lamellar period D${tag}`, value: sig(s.bulkPeriod, 5), unit: 'Rg' });
      rows.push({ name: `F(H) minima${tag}`, value: s.minima.map((m) => `${sig(m.thickness, 4)} Rg${s.bulkPeriod > 0 ? ` = ${sig(m.thickness / s.bulkPeriod, 3)} D` : ''} (${m.layers.length} layers)`).join(', ') || 'none inside the scanned range' });
    }
    return rows;
  }
  if (input.sweep) {
    const series = sweepSeries(input.sweep);
    rows.push({ name: 'points solved', value: `${input.sweep.points.length} (${input.sweep.points.filter((p) => p.converged).length} converged)` });
    for (const s of series) {
      const tag = series.length > 1 ? ` (f = ${sig(s.f, 3)}, b_A/b_B = ${sig(s.ratio, 3)})` : '';
      rows.push({ name: `RPA spinodal χN${tag}`, value: sig(s.spinodalChiN, 5) });
      if (s.odt) rows.push({ name: `order–disorder estimate χN${tag}`, value: `${sig(s.odt.estimate, 4)} (between grid points ${sig(s.odt.bracket[0], 4)} and ${sig(s.odt.bracket[1], 4)})` });
      if (s.exponent) rows.push({ name: `D ∝ χN^a, fitted a${tag}`, value: `${sig(s.exponent.value, 3)} ± ${sig(s.exponent.standardError, 2)} (χN ${sig(s.exponent.chiNRange[0], 3)}–${sig(s.exponent.chiNRange[1], 3)}; 1/6 in the strong-segregation limit)` });
    }
    return rows;
  }
  const net = input.networkMetrics;
  if (input.film) {
    const f = input.film;
    // A film train run leads with the network's error and verdict, as a periodic one does.
    if (net) rows.push(...networkRows(net, input));
    // Between walls the φA error can hide a φB error at a wall: the sum shows it.
    if (net?.incompressibilityMax !== undefined) rows.push({ name: 'network max |φA + φB − 1|', value: sci(net.incompressibilityMax), unit: '–' });
    const ref = net ? 'reference ' : '';
    rows.push({ name: 'film thickness H', value: periodText(f.thickness, rgNm, 5) });
    rows.push({ name: 'wall affinities for A, bottom / top', value: `${sig(f.walls.bottom, 4)} / ${sig(f.walls.top, 4)}`, unit: 'kT per chain' });
    rows.push({ name: 'layers (bottom first)', value: `${f.layers.A + f.layers.B}: ${[...f.layers.sequence].join(' ')} (${f.layers.A} A-rich, ${f.layers.B} B-rich)` });
    rows.push({ name: `${ref}phase`, value: phaseText(f.solution.phase) });
    rows.push({ name: `${ref}free energy F`, value: sig(f.solution.freeEnergy, 7), unit: 'kT per chain' });
    if (f.freeEnergyPerArea !== undefined) rows.push({ name: `${ref}F per area F·H`, value: sig(f.freeEnergyPerArea, 6), unit: 'kT ρ₀Rg/N' });
    if (f.scan?.minima.length) rows.push({ name: 'F(H) minima', value: f.scan.minima.map((m) => `${sig(m.thickness, 4)} Rg (${m.layers})`).join(', ') });
    return rows;
  }
  const ref = input.profiles?.reference ?? input.propagators?.reference;
  if (net) rows.push(...networkRows(net, input));
  else if (input.training?.phases.length) rows.push(trainingRow(input.training));
  if (ref) rows.push(...solutionRows(ref, rgNm, input.periodSearch?.periodTolerance).map((r) => (net ? { ...r, name: `reference ${r.name}` } : r)));
  return rows;
}

export function chainLine(input: ReportInput): string {
  const chain = buildChain(input.info.system.chain);
  return `${chain.label} (${input.info.system.chain.type}), A fraction f = ${sig(chain.speciesFraction.A, 4)}${input.sweep || input.spacingFit ? '' : `, χN = ${sig(input.info.system.chiN, 6)}`}`;
}

/**
 * A sweep over film thickness: F(H) per chain against H for each (χN, walls), the minima of F
 * per chain (the thicknesses the layers prefer) marked with their layer counts, the bulk period
 * D as a second axis H/D and as guides at the thicknesses where whole layers fit (n·D with both
 * walls preferring one block, (n + ½)·D with the walls preferring opposite blocks: Matsen,
 * J. Chem. Phys. 106, 7781 (1997)), the lower convex hull of F per area and the terraces
 * (spectral/thickness-scan.ts), and the table of every point.
 * H and D in Rg; F in kT per chain; F·H (per area) in kT ρ₀Rg/N.
 */
import type { Block, ReportPage } from '../document.js';
import { drawLineChart } from '../charts/line-chart.js';
import type { GuideLine, LineSeries } from '../charts/line-chart.js';
import type { FilmSweepInput, FilmSweepScanInput, ReportInput } from '../report-inputs.js';
import { CONTENT_WIDTH } from '../style.js';
import { sig } from '../format.js';
import type { ReportSection } from './section.js';

const layerCount = (sequence: string): number => sequence.length;

function scanLabel(s: FilmSweepScanInput, all: FilmSweepScanInput[]): string {
  const parts: string[] = [];
  if (new Set(all.map((a) => a.chiN)).size > 1) parts.push(`χN = ${sig(s.chiN, 4)}`);
  if (new Set(all.map((a) => a.f)).size > 1) parts.push(`f = ${sig(s.f, 3)}`);
  if (new Set(all.map((a) => a.segmentRatio)).size > 1) parts.push(`b_A/b_B = ${sig(s.segmentRatio, 3)}`);
  if (new Set(all.map((a) => `${a.walls.bottom},${a.walls.top}`)).size > 1) parts.push(`affinities ${sig(s.walls.bottom, 3)}, ${sig(s.walls.top, 3)}`);
  return parts.length ? `F(H), ${parts.join(', ')}` : 'F(H)';
}

/** Thicknesses inside [lo, hi] where whole layers fit for these walls: n·D, or (n + ½)·D for opposite preferences. */
export function commensurateThicknesses(D: number, walls: { bottom: number; top: number }, lo: number, hi: number): { value: number; label: string }[] {
  if (!(D > 0)) return [];
  const opposite = walls.bottom * walls.top < 0;
  const out: { value: number; label: string }[] = [];
  for (let n = 0; n <= Math.ceil(hi / D) + 1; n++) {
    const m = opposite ? n + 0.5 : n;
    const H = m * D;
    if (H > 0 && H >= lo && H <= hi) out.push({ value: H, label: `${sig(m, 3)}D` });
  }
  return out;
}

function terraceText(s: FilmSweepScanInput): string {
  const t = s.terraces;
  if (!t) return '';
  const g = (v: number) => sig(v, 4);
  return t.kind === 'uniform'
    ? ` A film of mean thickness ${g(t.meanThickness)} Rg (the config's cell.thickness) stays uniform.`
    : ` A film of mean thickness ${g(t.meanThickness)} Rg (the config's cell.thickness) splits into terraces of ${t.thicknesses.map(g).join(' and ')} Rg covering ${t.areaShares.map((a) => `${(100 * a).toFixed(0)} %`).join(' and ')} of the area.`;
}

function scanFigure(f: FilmSweepInput): Block {
  const scans = f.scans;
  const series: LineSeries[] = [];
  scans.forEach((s, k) => {
    series.push({ label: scanLabel(s, scans), style: k === 0 ? 0 : 2 * k, markers: true, points: s.points.filter((p) => p.converged).map((p) => ({ x: p.thickness, y: p.freeEnergy })) });
  });
  const minima = scans.flatMap((s) => s.minima);
  series.push({ label: 'minima of F per chain', style: 1, line: false, markers: true, markerSize: 5, points: minima.map((m) => ({ x: m.thickness, y: m.freeEnergy })) });
  const hs = scans.flatMap((s) => s.points.map((p) => p.thickness));
  const [lo, hi] = [Math.min(...hs), Math.max(...hs)];
  const oneD = new Set(scans.map((s) => s.bulkPeriod)).size === 1 && scans[0].bulkPeriod > 0 ? scans[0].bulkPeriod : undefined;
  const oneWalls = new Set(scans.map((s) => `${Math.sign(s.walls.bottom * s.walls.top)}`)).size === 1;
  const guides: GuideLine[] = [];
  if (oneD && oneWalls) for (const c of commensurateThicknesses(oneD, scans[0].walls, lo, hi)) guides.push({ axis: 'x', value: c.value, label: c.label, style: 6 });
  minima.forEach((m) => guides.push({ axis: 'x', value: m.thickness, label: `${layerCount(m.layers)} layers`, style: 1, labelRow: 1 }));
  const per = scans
    .map((s) => {
      const D = s.bulkPeriod > 0 ? `bulk period D = ${sig(s.bulkPeriod, 5)} Rg` : `no bulk period (${s.bulkNote ?? 'disordered'})`;
      const mins = s.minima.length ? s.minima.map((m) => `H = ${sig(m.thickness, 4)} Rg${s.bulkPeriod > 0 ? ` = ${sig(m.thickness / s.bulkPeriod, 3)} D` : ''} (${layerCount(m.layers)} layers, ${m.layers})`).join(', ') : 'none inside the scanned range';
      return `${scanLabel(s, scans)} (walls ${sig(s.walls.bottom, 3)} / ${sig(s.walls.top, 3)}): ${D}; minima ${mins}; thicknesses on the lower convex hull of F per area: ${s.stable.map((h) => sig(h, 4)).join(', ') || 'none'} Rg.${terraceText(s)}`;
    })
    .join(' ');
  const bad = scans.reduce((a, s) => a + s.points.filter((p) => !p.converged).length, 0);
  return {
    type: 'figure',
    id: 'sweep-film-free-energy-thickness',
    width: CONTENT_WIDTH,
    height: 260,
    caption:
      `Figure: free energy per chain F (kT per chain; not per area) against film thickness H (Rg) at fixed walls, ${hs.length} points${bad ? `, ${bad} not converged and not drawn` : ''}. ` +
      `Large markers and labelled lines: the minima of F per chain (a parabola through the lowest point and its neighbours), the thicknesses the layers prefer, with their number of layers (A-rich plus B-rich, bottom wall first). ` +
      `${oneD ? `Dotted lines: the thicknesses where whole layers of the bulk period fit (${scans[0].walls.bottom * scans[0].walls.top < 0 ? '(n + ½)·D, walls preferring opposite blocks' : 'n·D, both walls preferring one block'}; Matsen, J. Chem. Phys. 106, 7781 (1997)); top axis H/D. ` : ''}` +
      `The bulk period D is the stress-free period of the periodic lamella at the same χN, f and b_A/b_B, solved for this report by the spectral reference (${f.bulkGrid.nx} points per period, ${f.bulkGrid.ns} contour steps). ${per} ` +
      'Free energies at different H are compared on one grid of the sweep config; the absolute F depends on the grid near the walls, the minima and differences much less (docs/physics.md, "Films").',
    draw: (r) =>
      drawLineChart(r, {
        series,
        xLabel: 'film thickness H / Rg',
        yLabel: 'F (kT per chain)',
        legend: true,
        guides,
        ...(oneD ? { topAxis: { label: 'H / D', scale: 1 / oneD } } : {}),
      }),
  };
}

function pointsTable(f: FilmSweepInput): Block {
  const many = f.scans.length > 1;
  // A sweep point does not solve the disordered film: the column shows only when some point has it.
  const dis = f.scans.some((s) => s.points.some((p) => Number.isFinite(p.freeEnergyDisordered)));
  const lead = many ? 2 : 0;
  return {
    type: 'table',
    header: [...(many ? ['χN', 'walls'] : []), 'H / Rg', 'H / D', 'layers', 'F (kT/chain)', 'F·H (kT ρ₀Rg/N)', ...(dis ? ['F_dis (kT/chain)'] : []), 'converged'],
    widths: [...(many ? [0.6, 0.9] : []), 0.8, 0.7, 2.2, 1.2, 1.3, ...(dis ? [1.2] : []), 0.9],
    alignRight: [...(many ? [0] : []), lead, lead + 1, lead + 3, lead + 4, ...(dis ? [lead + 5] : [])],
    rows: f.scans.flatMap((s) =>
      s.points.map((p) => [
        ...(many ? [sig(s.chiN, 4), `${sig(s.walls.bottom, 3)} / ${sig(s.walls.top, 3)}`] : []),
        sig(p.thickness, 5),
        s.bulkPeriod > 0 ? sig(p.thickness / s.bulkPeriod, 3) : '–',
        p.layers ? `${layerCount(p.layers)}: ${[...p.layers].join(' ')}` : '–',
        Number.isFinite(p.freeEnergy) ? sig(p.freeEnergy, 7) : 'n/a',
        Number.isFinite(p.freeEnergyPerArea) ? sig(p.freeEnergyPerArea, 7) : 'n/a',
        ...(dis ? [Number.isFinite(p.freeEnergyDisordered) ? sig(p.freeEnergyDisordered, 6) : 'n/a'] : []),
        p.converged ? 'yes' : 'NO',
      ]),
    ),
  };
}

function filmSweepPages(f: FilmSweepInput, chainLabel: string): ReportPage[] {
  return [
    { heading: `Sweep of ${chainLabel} films: free energy against thickness`, blocks: [scanFigure(f)] },
    { heading: 'Film sweep: every point', blocks: [{ type: 'text', style: 'small', lines: ['Layers are counted from the bottom wall: a layer is a run of φA > φB (A) or φB > φA (B) by more than 0.02. F·H is the free energy per area (per chain times thickness). D is the bulk lamellar period named under the F(H) figure.'] }, pointsTable(f)] },
  ];
}

export const filmSweepSection: ReportSection = { id: 'film-sweep', pages: (input: ReportInput) => (input.sweep?.film ? filmSweepPages(input.sweep.film, input.sweep.chainLabel) : []) };

/**
 * Sweep and film report pages from inputs built here: the sweep's analysis (strong-segregation
 * exponent, order–disorder estimate) against data with known answers, and the page text read
 * back with pdftotext.
 */
import { describe, expect, it } from 'vitest';
import { buildReport } from '../../src/reports/build-report.js';
import { renderPdf } from '../../src/reports/render-pdf.js';
import type { ReportInput, SweepPointInput } from '../../src/reports/report-inputs.js';
import { sweepSeries } from '../../src/reports/sections/sweep-analysis.js';
import { buildChain } from '../../src/physics/chain.js';
import { spinodal } from '../../src/physics/rpa.js';
import { solveFilm } from '../../src/spectral/film-solve.js';
import { FilmCell } from '../../src/physics/cell/film-cell.js';
import { scanThickness } from '../../src/spectral/thickness-scan.js';
import { runInfo } from './fixtures.js';
import { readSweep } from '../../src/reports/readers/sweep-file.js';
import { commensurateThicknesses } from '../../src/reports/sections/film-sweep-section.js';
import { sweepConfigSchema } from '../../src/io/schemas/sweep-config.js';
import type { SweepTable } from '../../src/io/formats/sweep.js';
import { solveFixedCell } from '../../src/spectral/scft-solver.js';
import { PeriodicCell } from '../../src/physics/cell/periodic-cell.js';
import { pdfFile, pdfText } from './pdf-tools.js';

/**
 * Points on exact laws: D = 1.2 χN^(1/6) (Semenov's strong-segregation scaling, Sov. Phys. JETP
 * 61, 733 (1985)) and F − F_dis = −0.01 (χN − 10.495)² above χN 10.495 (the continuous
 * mean-field transition at f = 1/2, Leibler 1980; 10.495 from memory), disordered below.
 */
function lawPoints(): SweepPointInput[] {
  return [8, 10, 12, 16, 20, 30, 40, 60, 80].map((chiN) => {
    const ordered = chiN > 10.495;
    return {
      chiN,
      f: 0.5,
      segmentRatio: 1,
      phase: ordered ? 'lamellar' : 'disordered',
      period: ordered ? 1.2 * chiN ** (1 / 6) : null,
      freeEnergy: ordered ? chiN / 4 - 0.01 * (chiN - 10.495) ** 2 : chiN / 4,
      freeEnergyDisordered: chiN / 4,
      Q: 1,
      converged: true,
      spinodalChiN: 10.495,
    };
  });
}

describe('sweep analysis', () => {
  it('recovers the exponent of an exact power law and the zero of −(χN − c)²', () => {
    const [s] = sweepSeries({ points: lawPoints(), chainLabel: 'A0.500-B0.500' });
    expect(s.exponent!.value).toBeCloseTo(1 / 6, 10);
    expect(s.exponent!.standardError).toBeLessThan(1e-10);
    expect(s.exponent!.chiNRange[1]).toBe(80);
    // √(F_dis − F) is exactly linear in χN here, so the extrapolation lands on 10.495.
    expect(s.odt!.estimate).toBeCloseTo(10.495, 9);
    expect(s.odt!.bracket).toEqual([10, 12]);
  });

  it('uses the RPA spinodal of the library: symmetric diblock 10.495 (Leibler 1980; from memory)', () => {
    expect(spinodal(buildChain({ type: 'diblock', f: 0.5, segmentRatio: 1 })).chiN).toBeCloseTo(10.495, 3);
  });

  it('draws F − F_dis, the period with the fitted exponent and Q, with units, and lists every point', () => {
    const input: ReportInput = { info: { ...runInfo('sweep'), period: Number.NaN }, sweep: { points: lawPoints(), chainLabel: 'A0.500-B0.500' } };
    const path = pdfFile(renderPdf(buildReport(input)));
    const p1 = pdfText(path, 1);
    expect(p1).toMatch(/order–disorder estimate χN\s+10\.5/);
    expect(p1).toMatch(/D ∝ χN\^a, fitted a\s+0\.167/);
    const all = pdfText(path);
    for (const s of ['F − F_dis (kT per chain)', 'period D / Rg', 'χN (–)', 'Q (–)', 'Semenov', 'D / Rg']) expect(all).toContain(s);
    expect(all).toMatch(/RPA spinodal χN = 10\.(49|5)/);
  });
});

describe('film pages', () => {
  // Solved once, used by several pages below: the film between two A-preferring walls (affinity 2)
  // at H = 3.7 Rg, and its F(H) scan over four thicknesses of five-layer films.
  const likeWalls = { bottom: { affinity: 2 }, top: { affinity: 2 }, range: 0.25 };
  const symmetric15 = { chain: { type: 'diblock' as const, f: 0.5, segmentRatio: 1 }, chiN: 15 };
  let likeFilm: ReturnType<typeof solveFilm> | undefined;
  const likeFilmAt37 = () => (likeFilm ??= solveFilm({ system: symmetric15, cell: new FilmCell(3.7, 32, likeWalls), contour: 40 }));
  let likeScan: ReturnType<typeof scanThickness> | undefined;
  const likeScanThicknesses = [5.6, 6.4, 7.2, 8.0];
  const likeScan4 = () => (likeScan ??= scanThickness({ system: symmetric15, walls: likeWalls, thicknesses: likeScanThicknesses, nx: 32, ns: 40 }));

  it('draw the profiles between the walls and count the layers', () => {
    const system = { chain: { type: 'diblock' as const, f: 0.5, segmentRatio: 1 }, chiN: 15 };
    const r = likeFilmAt37();
    const input: ReportInput = {
      info: { ...runInfo('solve'), system },
      film: { solution: r.solution, thickness: 3.7, walls: { bottom: 2, top: 2, range: 0.25 }, layers: r.layers, freeEnergyPerArea: r.freeEnergyPerArea },
    };
    const doc = buildReport(input);
    expect(doc.pages.map((p) => p.heading)).toContain(`Film: ${r.layers.A + r.layers.B} layers between the walls`);
    const path = pdfFile(renderPdf(doc));
    const all = pdfText(path);
    for (const s of ['depth z / Rg', 'bottom wall, affinity +2', 'top wall, affinity +2', 'film thickness H', `${r.layers.A + r.layers.B}: ${[...r.layers.sequence].join(' ')}`, 'A film between flat walls']) expect(all).toContain(s);
    // Both walls prefer A: the outermost layers are A-rich (common practice, no source).
    expect(r.layers.sequence[0]).toBe('A');
    expect(r.layers.sequence[r.layers.sequence.length - 1]).toBe('A');
  });

  it('of a train run: page 1 leads with the network error and verdict; the profiles draw network and reference with a legend', () => {
    const system = { chain: { type: 'diblock' as const, f: 0.5, segmentRatio: 1 }, chiN: 15 };
    const walls = { bottom: { affinity: 1 }, top: { affinity: -1 }, range: 0.25 };
    const r = solveFilm({ system, cell: new FilmCell(3.7, 32, walls), contour: 40 });
    // FIXTURE, not a network: the spectral film at χN 15.5, relabelled; it only drives the overlay and the differences.
    const other = solveFilm({ system: { ...system, chiN: 15.5 }, cell: new FilmCell(3.7, 32, walls), contour: 40 });
    const network = { ...other.solution, solver: 'network' as const };
    const input: ReportInput = {
      info: { ...runInfo('train'), system },
      film: { solution: r.solution, network, thickness: 3.7, walls: { bottom: 1, top: -1, range: 0.25 }, layers: r.layers },
      networkMetrics: { phiA: { relativeL2: 4.04e-3, maxError: 9.1e-3 }, exchangeField: { relativeL2: 2e-2, maxError: 0.1 }, QRelativeError: 1e-3, freeEnergyError: -2.5e-4, freshResiduals: {}, phase: 'lamellar', incompressibilityMax: 1.1e-2 },
    };
    const path = pdfFile(renderPdf(buildReport(input)));
    const p1 = pdfText(path, 1);
    expect(p1).toMatch(/network φA error, relative L2 \(max\)\s+4\.04e-3 \(9\.10?e-3\)/);
    expect(p1).toMatch(/network F − reference F\s+-2\.50?e-4/);
    expect(p1).toMatch(/network density\s+lamellar/);
    expect(p1).toMatch(/network max \|φA \+ φB − 1\|\s+1\.10e-2/);
    expect(p1).toContain('reference free energy F');
    const all = pdfText(path);
    for (const s of ['φA network', 'φA reference', 'φB network', 'φB reference', 'Δφ (–)', 'Δ(wA − wB) (kT)']) expect(all).toContain(s);
    const flat = all.replace(/\s+/g, ' ');
    expect(flat).toContain('The network (solid) and the spectral reference (dashed)');
    expect(flat).toContain('Network solid, reference dashed');
    // The caption's largest difference is the one of the drawn arrays, computed here independently.
    let m = 0;
    for (let i = 0; i < network.phi.A.length; i++) m = Math.max(m, Math.abs(network.phi.A[i] - r.solution.phi.A[i]));
    expect(flat).toContain(`max |ΔφA| = ${m.toExponential(2)}`);
  });

  it('draw R(Q) against data when a reflectivity fit fills the hook', () => {
    const system = { chain: { type: 'diblock' as const, f: 0.5, segmentRatio: 1 }, chiN: 15 };
    const r = likeFilmAt37();
    // Fresnel reflectivity of a bare substrate, R = |(Q − √(Q² − Qc²))/(Q + √(Q² − Qc²))|², Qc = 0.02 (Parratt 1954 limit; common practice).
    const q = Array.from({ length: 40 }, (_, i) => 0.025 + 0.005 * i);
    const model = q.map((Q) => ((Q - Math.sqrt(Q * Q - 0.0004)) / (Q + Math.sqrt(Q * Q - 0.0004))) ** 2);
    const input: ReportInput = {
      info: { ...runInfo('solve'), system },
      film: { solution: r.solution, thickness: 3.7, walls: { bottom: 2, top: 2, range: 0.25 }, layers: r.layers, reflectivity: { q, r: model.map((m) => m * 1.02), dr: model.map((m) => 0.05 * m), model, qUnit: '1/Å' } },
    };
    const all = pdfText(pdfFile(renderPdf(buildReport(input))));
    for (const s of ['Film: specular reflectivity', 'Q (1/Å)', 'R·Q⁴', 'R (–)']) expect(all).toContain(s);
  });

  it('draw F(H) from a thickness scan with its minima marked', () => {
    const system = { chain: { type: 'diblock' as const, f: 0.5, segmentRatio: 1 }, chiN: 15 };
    const walls = { bottom: { affinity: 2 }, top: { affinity: 2 }, range: 0.25 };
    // Four thicknesses of five-layer films; the one at 6.4 Rg is lowest (measured: F 2.946, 2.924, 2.937 kT per chain at 5.6, 6.4, 7.2), so one minimum.
    const scan = likeScan4();
    expect(scan.minima.length).toBe(1);
    const r = solveFilm({ system, cell: new FilmCell(3.8, 16, walls), contour: 40 });
    const input: ReportInput = { info: { ...runInfo('solve'), system }, film: { solution: r.solution, thickness: 3.8, walls: { bottom: 2, top: 2, range: 0.25 }, layers: r.layers, scan } };
    const all = pdfText(pdfFile(renderPdf(buildReport(input))));
    for (const s of ['Film: free energy against thickness', 'film thickness H / Rg', 'F (kT per chain)', 'minima']) expect(all).toContain(s);
    for (const m of scan.minima) expect(all).toContain(`H = ${Number(m.thickness.toPrecision(4))} Rg`);
  });

  it('of a sweep over thickness: F(H) per chain with its minima, layer counts and the bulk period', () => {
    const system = { chain: { type: 'diblock' as const, f: 0.5, segmentRatio: 1 }, chiN: 15 };
    const walls = likeWalls;
    const hs = likeScanThicknesses;
    const config = sweepConfigSchema.parse({ version: 2, kind: 'sweep', system: { chain: { type: 'diblock' } }, parameters: { chiN: [15], thickness: hs }, cell: { kind: 'film', thickness: 6.8, walls, nx: 32, ns: 40 } });
    // The sweep's points, solved here by the film solver directly (as a sweep solves each point).
    const scan = likeScan4();
    const points = scan.points.map((p, index) => ({
      index, chiN: 15, f: 0.5, segmentRatio: 1, thickness: p.thickness, affinityBottom: 2, affinityTop: 2, freeEnergyPerArea: p.freeEnergyPerArea, layers: p.layers,
      phase: p.phase, period: null, periodTolerance: null, freeEnergy: p.freeEnergy, freeEnergyDisordered: null, freeEnergyExcess: null, Q: 1, iterations: 1, totalIterations: 1, evaluations: 1, residual: 0, converged: p.converged, seconds: 0, notes: [],
    }));
    // Through the sweep reader, as `report` reads sweep.json.
    const film = readSweep({ config, points } as unknown as SweepTable, 'sweep.json').sweep.film!;
    expect(film.scans.length).toBe(1);
    const [sc] = film.scans;
    expect(sc.minima.length).toBe(1);
    // The bulk period is stress-free: F of the periodic lamella is lowest there (common practice, no source).
    const D = sc.bulkPeriod;
    const F = (L: number) => solveFixedCell({ system, cell: new PeriodicCell(L, 32, 1), contour: 40 }).freeEnergy;
    expect(F(D)).toBeLessThan(F(0.97 * D));
    expect(F(D)).toBeLessThan(F(1.03 * D));
    // The terraces of the config's mean thickness 6.8 Rg lie inside the scanned range.
    expect(sc.terraces?.meanThickness).toBe(6.8);
    const input: ReportInput = { info: { ...runInfo('sweep'), system, period: Number.NaN }, sweep: { points: points.map((p) => ({ ...p, spinodalChiN: 10.495 })), chainLabel: 'A0.500-B0.500', film } };
    const doc = buildReport(input);
    expect(doc.pages.map((p) => p.heading)).toContain('Sweep of A0.500-B0.500 films: free energy against thickness');
    // The χN pages of a sweep are left out: one χN has no order–disorder transition to show.
    expect(doc.pages.map((p) => p.heading).some((h) => h.includes('order–disorder'))).toBe(false);
    const path = pdfFile(renderPdf(doc));
    const flat = pdfText(path).replace(/\s+/g, ' ');
    for (const t of ['film thickness H / Rg', 'F (kT per chain)', 'H / D', 'free energy per chain F (kT per chain; not per area)', `bulk period D = ${Number(D.toPrecision(5))} Rg`, 'minima of F per chain', `${sc.minima[0].layers.length} layers`, 'F·H (kT ρ₀Rg/N)']) expect(flat).toContain(t);
    expect(pdfText(path, 1)).toMatch(/bulk lamellar period D\s+3\.7/);
    for (const p of scan.points) expect(flat).toContain(`${p.layers.length}: ${[...p.layers].join(' ')}`);
  });

  it('mark the thicknesses where whole layers fit: n·D for like walls, (n + ½)·D for unlike (Matsen, J. Chem. Phys. 106, 7781 (1997))', () => {
    expect(commensurateThicknesses(4, { bottom: 1, top: 1 }, 3, 9).map((c) => c.value)).toEqual([4, 8]);
    expect(commensurateThicknesses(4, { bottom: 1, top: -1 }, 1, 11).map((c) => c.value)).toEqual([2, 6, 10]);
    expect(commensurateThicknesses(4, { bottom: -1, top: 1 }, 1, 11).map((c) => c.label)).toEqual(['0.5D', '1.5D', '2.5D']);
    expect(commensurateThicknesses(Number.NaN, { bottom: 1, top: 1 }, 1, 11)).toEqual([]);
  });
});

/**
 * Every report kind renders from fixture inputs (fixtures.ts): PDF page count and text read
 * back with poppler's pdfinfo/pdftotext, PNG sizes from the PNG header, pixels decoded with
 * canvas's loadImage, byte-identical output for identical input.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { createCanvas, loadImage } from 'canvas';
import type { ScftSolution } from '../../src/physics/result.js';
import { buildReport } from '../../src/reports/build-report.js';
import { figuresOf } from '../../src/reports/document.js';
import type { ReportDocument } from '../../src/reports/document.js';
import { pdfPageCount, renderPdf } from '../../src/reports/render-pdf.js';
import { PNG_PADDING, pngSize, renderFigurePng } from '../../src/reports/render-png.js';
import type { ReportInput } from '../../src/reports/report-inputs.js';
import { inversionFixture, networkInput, runInfo, solveAt, solveInput, trainingFixture } from './fixtures.js';
import { pdfFile, pdfInfo, pdfText, pdfWords, pngHeader } from './pdf-tools.js';

let reference: ScftSolution;
let fixtureNetwork: ScftSolution;

beforeAll(() => {
  reference = solveAt(15);
  fixtureNetwork = solveAt(15.6, reference);
  expect(reference.converged && fixtureNetwork.converged).toBe(true);
  expect(reference.phase).toBe('lamellar');
});

interface Rendered {
  doc: ReportDocument;
  path: string;
  pdf: Buffer;
}

function render(input: ReportInput): Rendered {
  const doc = buildReport(input);
  const pdf = renderPdf(doc);
  return { doc, pdf, path: pdfFile(pdf) };
}

/** Share of pixels that are not white: a figure that drew nothing (or was wiped) has none. */
async function inkFraction(png: Buffer): Promise<number> {
  const img = await loadImage(png);
  const c = createCanvas(img.width, img.height);
  const ctx = c.getContext('2d');
  ctx.drawImage(img, 0, 0);
  const d = ctx.getImageData(0, 0, img.width, img.height).data;
  let ink = 0;
  for (let i = 0; i < d.length; i += 4) if (d[i] < 245 || d[i + 1] < 245 || d[i + 2] < 245) ink++;
  return ink / (d.length / 4);
}

describe('solve report', () => {
  let r: Rendered;
  beforeAll(() => {
    r = render(solveInput(reference));
  });

  it('has title, profiles, propagators, period search and metrics pages, nothing overflowing', () => {
    expect(r.doc.pages.map((p) => p.heading)).toEqual(['mesofield solve report', 'Density and field profiles', 'Chain propagators', 'Equilibrium period search', 'Metrics', 'Appendix: assumptions and settings']);
    // Metrics and the appendix flow onto the period-search page when it has room.
    expect(pdfPageCount(r.doc)).toBe(pdfInfo(r.path).Pages === '4' ? 4 : 5);
    expect(Number(pdfInfo(r.path).Pages)).toBeLessThanOrEqual(5);
  });

  it('carries the run date, not the clock, as the PDF creation date', () => {
    expect(pdfInfo(r.path).CreationDate).toMatch(/^2024-05-06T07:08:09/);
  });

  it('prints the system, the headline results with units, axis labels and assumptions as extractable text', () => {
    const title = pdfText(r.path, 1);
    expect(title).toContain('A0.500-B0.500');
    expect(title).toContain('χN = 15');
    // 3.7 Rg × 4.5 nm per Rg = 16.65 nm: the period in nm first, Rg second, on page 1.
    expect(title).toContain('16.65 nm (3.7 Rg)');
    expect(title).toMatch(new RegExp(`free energy F\\s+${reference.freeEnergy.toPrecision(7).replace('.', '\\.')}\\s+kT per chain`));
    expect(title).toContain('2024-05-06T07:08:09.000Z');
    expect(title).toContain('mesofield 0.0.0-fixture');
    expect(title).toContain('Run time: 1.25 s');
    expect(title).not.toContain('give --rg-nm');
    expect(pdfText(r.path, 2)).toMatch(/x \/ Rg[\s\S]*wA − wB \(kT\)/);
    const period = pdfText(r.path, 4);
    expect(period).toContain('F (kT per chain)');
    expect(period).toContain('L* = 3.7 Rg');
    const all = pdfText(r.path);
    for (const s of ['Mean-field', 'Incompressible', 'Gaussian', 'One-dimensional lamellae', '32, 32, 32']) expect(all).toContain(s);
    // A solve fits no χN: no caution about fitting one; an iteration count carries no unit.
    expect(all).not.toContain('χN fitted to data');
    expect(all).toMatch(/iterations of the final solve\s+\d+\s*\n/);
    expect(all).not.toContain('values]');
    // Each heading once (continued pages say so).
    const headings = r.doc.pages.map((p) => p.heading);
    expect(new Set(headings).size).toBe(headings.length);
  });

  it('is byte-identical when rendered twice', () => {
    expect(Buffer.compare(renderPdf(buildReport(solveInput(reference))), r.pdf)).toBe(0);
  });

  it('writes PNGs of the stated size and DPI, identical run to run, with ink on them', async () => {
    const figs = figuresOf(r.doc);
    expect(figs.map((f) => f.id)).toEqual(['profiles-phi', 'profiles-exchange-field', 'propagators', 'period-search']);
    for (const dpi of [72, 150]) {
      for (const f of figs) {
        const png = renderFigurePng(f, dpi);
        const h = pngHeader(png);
        expect(h.width).toBe(Math.round(((f.width + 2 * PNG_PADDING) * dpi) / 72));
        expect(h).toMatchObject(pngSize(f, dpi));
        // pHYs is in pixels per metre: dpi / 0.0254.
        expect(h.pixelsPerMetre).toBe(Math.round(dpi / 0.0254));
        const img = await loadImage(png);
        expect([img.width, img.height]).toEqual([h.width, h.height]);
      }
    }
    const once = renderFigurePng(figs[2], 100);
    expect(Buffer.compare(once, renderFigurePng(figs[2], 100))).toBe(0);
    for (const f of figs) expect(await inkFraction(renderFigurePng(f, 60))).toBeGreaterThan(0.03);
  });
});

describe('axes', () => {
  it('label x ticks at their own values when the data do not start on a round number', () => {
    // Data from 3.264 to 3.876: chart.js on its own adds 3.264 as a tick labelled "3.3".
    const input = solveInput(reference);
    input.periodSearch = { trace: [3.264, 3.43, 3.6, 3.876].map((period) => ({ period, freeEnergy: 3.43 + (period - 3.6) ** 2, phase: 'lamellar', iterations: 10 })), period: 3.6 };
    const r = render(input);
    const candidates = pdfWords(r.path, 4).filter((w) => /^3\.\d$/.test(w.text));
    // Tick labels are the row of such words sharing one baseline (the guide label and caption are elsewhere).
    const rowOf = (w: { yMid: number }): number => Math.round(w.yMid);
    const counts = new Map<number, number>();
    for (const w of candidates) counts.set(rowOf(w), (counts.get(rowOf(w)) ?? 0) + 1);
    const axisRow = [...counts.entries()].sort((a, b) => b[1] - a[1])[0][0];
    const ticks = candidates.filter((w) => rowOf(w) === axisRow).sort((a, b) => a.xMid - b.xMid);
    const values = ticks.map((t) => Number(t.text));
    expect(values).toEqual([3.3, 3.4, 3.5, 3.6, 3.7, 3.8]);
    // The guide at L = 3.6 is a data-coordinate line; its label starts 3 pt right of it.
    // The "3.6" tick label must be centred on that same x (a shifted tick set would not be).
    const guideX = pdfWords(r.path, 4).find((w) => w.text === 'L*')!.xMin - 3;
    const tick36 = ticks.find((t) => t.text === '3.6')!;
    expect(Math.abs(tick36.xMid - guideX)).toBeLessThan(0.8);
    // And labels are equally spaced: position is linear in value.
    const dx = (ticks[ticks.length - 1].xMid - ticks[0].xMid) / (values[values.length - 1] - values[0]);
    ticks.forEach((t) => expect(Math.abs(t.xMid - (ticks[0].xMid + (Number(t.text) - values[0]) * dx))).toBeLessThan(0.6));
  });
});

describe('network-vs-reference report (fixture network)', () => {
  it('overlays both solutions and draws their differences', () => {
    const r = render(networkInput(reference, fixtureNetwork));
    expect(pdfPageCount(r.doc)).toBe(Number(pdfInfo(r.path).Pages));
    const profiles = pdfText(r.path, 2);
    expect(profiles).toContain('φA fixture χN 15.6');
    expect(profiles).toContain('φA: fixture χN 15.6 − reference');
    expect(profiles).toContain('Δφ (–)');
    const prop = pdfText(r.path, 3);
    // Four panels, none empty: q of both, and the differences of q and q†.
    expect(prop).toContain('q difference, fixture χN 15.6 − reference');
    expect(prop).toContain('q† difference, fixture χN 15.6 − reference');
    const metrics = pdfText(r.path);
    expect(metrics).toContain('φA relative L2 error');
    expect(metrics).toContain('fixture metric');
    expect(pdfText(r.path, 1)).toContain('network backend wasm (fixture), tfjs 4.22.0');
  });

  it('states the largest φA difference it drew, computed independently here', () => {
    let m = 0;
    for (let j = 0; j < reference.nx; j++) m = Math.max(m, Math.abs(fixtureNetwork.phi.A[j] - reference.phi.A[j]));
    expect(m).toBeGreaterThan(1e-3); // the fixture really differs
    const r = render(networkInput(reference, fixtureNetwork));
    expect(pdfText(r.path, 2)).toContain(`max |Δφ_A| = ${m.toExponential(2)}`.replace('Δφ_A', 'ΔφA'));
  });

  it('refuses solutions on different grids, naming both', () => {
    const other = { ...fixtureNetwork, nx: 16 };
    expect(() => buildReport(networkInput(reference, other))).toThrow(/the network solution and the reference differ \(nx = 16 against nx = 32\)/);
  });
});

describe('training report', () => {
  it('reads every phase of the history onto one iteration axis, with the wall time', () => {
    const t = trainingFixture();
    // 50 warm-start steps, then Adam steps 1..100 at 51..150, then L-BFGS iterations 1..80 at 151..230.
    expect(t.phases.map((p) => [p.name, p.from, p.to, p.iterations])).toEqual([
      ['warm start', 1, 50, 50],
      ['Adam', 51, 150, 100],
      ['L-BFGS', 151, 230, 80],
    ]);
    expect(t.wallClock).toBe(true);
    expect(t.records.filter((r) => r.referenceError !== undefined).map((r) => r.iteration)).toEqual([100, 150, 190, 230]);
  });

  it('draws the loss over every phase against iterations and wall time, phase boundaries marked, no learning-rate panel', async () => {
    const r = render({ info: runInfo('train'), training: trainingFixture() });
    const t = pdfText(r.path, 2);
    for (const s of ['loss, warm start', 'loss, Adam', 'loss, L-BFGS', 'φA relative L2 error vs reference', 'iteration (all phases)', 'wall time since the run started (s)', 'true χN = 15']) expect(t).toContain(s);
    expect(t).toContain('warm start (50 iterations');
    expect(t).not.toContain('learning rate');
    const figs = figuresOf(r.doc);
    expect(figs.map((f) => f.id)).toEqual(['training-loss', 'training-chiN']);
    for (const f of figs) expect(await inkFraction(renderFigurePng(f, 60))).toBeGreaterThan(0.02);
  });
});

describe('inversion report', () => {
  it('shows data with errors, fit, residuals, the profile likelihood and the estimator table', async () => {
    // Noise-free fixture data made at χN = 15: the profile minimum must sit exactly there.
    const exact = inversionFixture(reference, 0);
    expect(exact.bestChiN).toBe(15);
    expect(exact.profileLikelihood.find((p) => p.chiN === 15)!.deltaChi2).toBe(0);
    expect(exact.interval.lower).toBeLessThan(15);
    expect(exact.interval.upper).toBeGreaterThan(15);
    const inv = inversionFixture(reference);
    const r = render({ info: runInfo('invert'), inversion: { ...inv, interval95: { lower: inv.interval.lower - 0.1, upper: inv.interval.upper + 0.1, threshold: 3.841 } } });
    const t = pdfText(r.path, 2);
    for (const s of ['φA data ± σ', 'residual / σ', 'Δχ² (–)', '68 % interval', '95 % interval', 'Δχ² = 3.84 (95 %)']) expect(t).toContain(s);
    // Table cells wrap rather than being cut off: every word of the estimator names and notes is there.
    for (const w of ['profile-likelihood', 'grid', 'minimum', 'true', 'fixture', 'data made at this χN']) expect(t).toContain(w);
    // χN with its interval on page 1; the caution about a fitted χN in the appendix.
    expect(pdfText(r.path, 1)).toMatch(/fitted χN[^\n]*68 %: [\d.]+ – [\d.]+; 95 %/);
    expect(pdfText(r.path)).toContain('χN fitted to data');
    for (const f of figuresOf(r.doc)) expect(await inkFraction(renderFigurePng(f, 60))).toBeGreaterThan(0.02);
  });

  it('rejects a data point without a positive σ, naming it', () => {
    const inv = inversionFixture(reference);
    inv.data[2].sigma = 0;
    expect(() => buildReport({ info: runInfo('invert'), inversion: inv })).toThrow(/inversion\.data\[2\]\.sigma: got 0/);
  });
});

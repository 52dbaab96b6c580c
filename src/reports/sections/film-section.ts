/**
 * A film between two walls: φA(z), φB(z) and wA − wB across the film with the walls drawn
 * and the layers counted (a train run: the network solid, the reference dashed, and their
 * difference beneath); F(H) with its minima when a thickness scan is present
 * (spectral/thickness-scan.ts); and, when a reflectivity fit fills the hook, R(Q) against the
 * data (log R, and R·Q⁴ which takes out the Fresnel decay). z and H in Rg; F in kT per chain.
 */
import type { Block, ReportPage } from '../document.js';
import { drawLineChart } from '../charts/line-chart.js';
import type { GuideLine, LineSeries } from '../charts/line-chart.js';
import { drawInSubRegion } from '../region.js';
import type { FilmInput, ReflectivityInput, ReportInput } from '../report-inputs.js';
import type { Region } from '../region.js';
import { assertSameGrid, difference, exchangeField, maxAbs, points } from '../solution-differences.js';
import { CONTENT_WIDTH, OKABE_ITO } from '../style.js';
import type { SeriesStyle } from '../style.js';
import { sci, sig } from '../format.js';
import type { ReportSection } from './section.js';

function wallGuides(f: FilmInput): GuideLine[] {
  const name = (a: number) => (a === 0 ? 'neutral' : `affinity ${a > 0 ? '+' : ''}${sig(a, 3)}`);
  return [
    { axis: 'x', value: 0, label: `bottom wall, ${name(f.walls.bottom)}`, style: 0 },
    { axis: 'x', value: f.thickness, label: `top wall, ${name(f.walls.top)}`, style: 0 },
  ];
}

/** z from wall to wall: the grid's cell centres plus both walls, where the profile is extended flat (reflecting walls: zero slope). */
function wallToWall(z: ArrayLike<number>, v: ArrayLike<number>, H: number): { x: number; y: number }[] {
  return [{ x: 0, y: v[0] }, ...points(z, v), { x: H, y: v[v.length - 1] }];
}

/**
 * Network solid, reference dashed in a lighter colour of the same family, so both show where
 * they overlay; φA in black/orange, φB in blue/sky blue.
 */
const CURVE: Record<'A' | 'B', Record<'network' | 'reference', SeriesStyle>> = {
  A: { network: { colour: OKABE_ITO.black, dash: [], marker: 'circle' }, reference: { colour: OKABE_ITO.orange, dash: [6, 3], marker: 'triangle' } },
  B: { network: { colour: OKABE_ITO.blue, dash: [], marker: 'rect' }, reference: { colour: OKABE_ITO.skyBlue, dash: [6, 3], marker: 'rectRot' } },
};

/** One panel on top, and when a network is drawn, its difference from the reference beneath on its own axis. */
function withDifference(top: (r: Region) => void, bottom: ((r: Region) => void) | undefined): (region: Region) => void {
  return (region) => {
    if (!bottom) return top(region);
    const h = region.height * 0.64;
    drawInSubRegion(region, 0, 0, region.width, h, top);
    drawInSubRegion(region, 0, h, region.width, region.height - h, bottom);
  };
}

function profileFigures(f: FilmInput): Block[] {
  const sol = f.solution;
  const net = f.network;
  if (net) assertSameGrid(sol, net, 'film profiles');
  const H = f.thickness;
  const layerText = `${f.layers.A + f.layers.B} layers, bottom first: ${[...f.layers.sequence].join(' ')} (${f.layers.A} A-rich, ${f.layers.B} B-rich; a layer is a run of φA > φB or φB > φA by more than 0.02)`;
  const guides = wallGuides(f);
  const phi: LineSeries[] = net
    ? [
        { label: 'φA network', style: CURVE.A.network, points: wallToWall(net.x, net.phi.A, H) },
        { label: 'φA reference', style: CURVE.A.reference, points: wallToWall(sol.x, sol.phi.A, H) },
        { label: 'φB network', style: CURVE.B.network, points: wallToWall(net.x, net.phi.B, H) },
        { label: 'φB reference', style: CURVE.B.reference, points: wallToWall(sol.x, sol.phi.B, H) },
      ]
    : [
        { label: 'φA', style: 0, points: wallToWall(sol.x, sol.phi.A, H) },
        { label: 'φB', style: 2, points: wallToWall(sol.x, sol.phi.B, H) },
      ];
  const dw = net ? difference(exchangeField(net), exchangeField(sol)) : undefined;
  const who = net
    ? `The network (solid) and the spectral reference (dashed), with network − reference beneath: max |ΔφA| = ${sci(maxAbs(difference(net.phi.A, sol.phi.A)))}, max |ΔφB| = ${sci(maxAbs(difference(net.phi.B, sol.phi.B)))}.`
    : `The ${sol.solver === 'network' ? 'network' : 'spectral reference'} solution (no ${sol.solver === 'network' ? 'reference' : 'network'} solution in this run).`;
  const wSeries: LineSeries[] = net
    ? [
        { label: 'wA − wB network', style: CURVE.A.network, points: wallToWall(net.x, exchangeField(net), H) },
        { label: 'wA − wB reference', style: CURVE.A.reference, points: wallToWall(sol.x, exchangeField(sol), H) },
      ]
    : [{ label: 'wA − wB', style: 0, points: wallToWall(sol.x, exchangeField(sol), H) }];
  const unlabelled = guides.map((g) => ({ ...g, label: undefined }));
  const zero: GuideLine = { axis: 'y', value: 0, style: 0 };
  return [
    {
      type: 'figure',
      id: 'film-profiles',
      width: CONTENT_WIDTH,
      height: net ? 330 : 240,
      caption: `Figure: volume fractions φA(z), φB(z) across the film of thickness H = ${sig(H, 5)} Rg between the walls (dotted lines; affinity > 0 attracts A, in kT per chain, acting over a range of ${sig(f.walls.range, 3)} Rg); ${sol.nx} grid points. ${who} ${layerText}.`,
      draw: withDifference(
        (r) => drawLineChart(r, { series: phi, xLabel: 'depth z / Rg (bottom wall at 0)', yLabel: 'volume fraction φ (–)', legend: true, xMin: 0, xMax: H, guides }),
        net
          ? (r) =>
              drawLineChart(r, {
                series: [
                  { label: 'φA: network − reference', style: CURVE.A.network, points: wallToWall(sol.x, difference(net.phi.A, sol.phi.A), H) },
                  { label: 'φB: network − reference', style: CURVE.B.reference, points: wallToWall(sol.x, difference(net.phi.B, sol.phi.B), H) },
                ],
                xLabel: 'depth z / Rg',
                yLabel: 'Δφ (–)',
                legend: true,
                xMin: 0,
                xMax: H,
                guides: [...unlabelled, zero],
              })
          : undefined,
      ),
    },
    {
      type: 'figure',
      id: 'film-exchange-field',
      width: CONTENT_WIDTH,
      height: net ? 250 : 170,
      caption: `Figure: exchange field wA − wB (kT) across the film; near a preferential wall it includes the response to the surface field.${dw ? ` Network solid, reference dashed, network − reference beneath: max |Δ(wA − wB)| = ${sci(maxAbs(dw))} kT.` : ''}`,
      draw: withDifference(
        (r) => drawLineChart(r, { series: wSeries, xLabel: 'depth z / Rg', yLabel: 'wA − wB (kT)', legend: !!net, xMin: 0, xMax: H, guides: unlabelled }),
        dw ? (r) => drawLineChart(r, { series: [{ label: 'network − reference', style: CURVE.A.network, points: wallToWall(sol.x, dw, H) }], xLabel: 'depth z / Rg', yLabel: 'Δ(wA − wB) (kT)', legend: false, xMin: 0, xMax: H, guides: [...unlabelled, zero] }) : undefined,
      ),
    },
  ];
}

function scanFigure(f: FilmInput): Block {
  const scan = f.scan!;
  const pts = [...scan.points].sort((a, b) => a.thickness - b.thickness);
  const series: LineSeries[] = [
    { label: 'F(H), converged', style: 0, markers: true, points: pts.filter((p) => p.converged).map((p) => ({ x: p.thickness, y: p.freeEnergy })) },
    { label: 'minima', style: 1, line: false, markers: true, markerSize: 5, points: scan.minima.map((m) => ({ x: m.thickness, y: m.freeEnergy })) },
  ];
  const bad = pts.filter((p) => !p.converged).length;
  return {
    type: 'figure',
    id: 'film-free-energy-thickness',
    width: CONTENT_WIDTH,
    height: 230,
    caption: `Figure: free energy per chain F against film thickness H at fixed walls (${pts.length} thicknesses${bad ? `, ${bad} not converged and not drawn` : ''}); minima (the thicknesses the layers prefer): ${scan.minima.map((m) => `H = ${sig(m.thickness, 4)} Rg (${m.layers})`).join(', ') || 'none inside the scan'}. A film of fixed material per area may split into terraces of the thicknesses on the lower convex hull of F·H: ${scan.stable.map((h) => sig(h, 4)).join(', ') || 'none'} Rg.`,
    draw: (r) => drawLineChart(r, { series, xLabel: 'film thickness H / Rg', yLabel: 'F (kT per chain)', legend: true, guides: scan.minima.map((m) => ({ axis: 'x', value: m.thickness, style: 6 })) }),
  };
}

function reflectivityFigure(rq: ReflectivityInput): Block {
  const order = rq.q.map((_, i) => i).sort((a, b) => rq.q[a] - rq.q[b]);
  const data = order.filter((i) => rq.r[i] > 0);
  const model = order.filter((i) => rq.model[i] > 0);
  const q4 = (i: number, v: number) => v * rq.q[i] ** 4;
  return {
    type: 'figure',
    id: 'film-reflectivity',
    width: CONTENT_WIDTH,
    height: 330,
    caption: `Figure: specular reflectivity R(Q) of the film${rq.label ? ` (${rq.label})` : ''}: data${rq.dr ? ' with one-σ error bars' : ''} and the model computed from the film's depth profile (top, log axis), and R·Q⁴, which takes out the Fresnel Q⁻⁴ decay so the fringes show (bottom). Q in ${rq.qUnit}.`,
    draw(region) {
      const h = region.height * 0.55;
      drawInSubRegion(region, 0, 0, region.width, h, (r) =>
        drawLineChart(r, {
          series: [
            { label: 'data', style: 1, line: false, markers: true, markerSize: 2, points: data.map((i) => ({ x: rq.q[i], y: rq.r[i] })) },
            { label: 'model', style: 0, points: model.map((i) => ({ x: rq.q[i], y: rq.model[i] })) },
          ],
          xLabel: `Q (${rq.qUnit})`,
          yLabel: 'R (–)',
          yLog: true,
          legend: true,
        }),
      );
      drawInSubRegion(region, 0, h, region.width, region.height - h, (r) =>
        drawLineChart(r, {
          series: [
            { label: 'data', style: 1, line: false, markers: true, markerSize: 2, points: data.map((i) => ({ x: rq.q[i], y: q4(i, rq.r[i]) })), ...(rq.dr ? { errorBars: data.map((i) => q4(i, rq.dr![i])) } : {}) },
            { label: 'model', style: 0, points: model.map((i) => ({ x: rq.q[i], y: q4(i, rq.model[i]) })) },
          ],
          xLabel: `Q (${rq.qUnit})`,
          yLabel: `R·Q⁴ (${rq.qUnit}⁴)`,
          legend: false,
        }),
      );
    },
  };
}

function filmPages(f: FilmInput): ReportPage[] {
  const pages: ReportPage[] = [{ heading: `Film: ${f.layers.A + f.layers.B} layers between the walls`, blocks: profileFigures(f) }];
  if (f.scan) pages.push({ heading: 'Film: free energy against thickness', blocks: [scanFigure(f)] });
  if (f.reflectivity) pages.push({ heading: 'Film: specular reflectivity', blocks: [reflectivityFigure(f.reflectivity)] });
  return pages;
}

export const filmSection: ReportSection = { id: 'film', pages: (input: ReportInput) => (input.film ? filmPages(input.film) : []) };

/**
 * Density and exchange-field profiles: reference as lines, network as markers, and the
 * pointwise error (network − reference) on its own axis beneath.
 */
import type { FigureBlock, ReportPage } from '../document.js';
import { drawLineChart } from '../charts/line-chart.js';
import type { LineSeries } from '../charts/line-chart.js';
import { drawInSubRegion } from '../region.js';
import type { ProfileInput, ReportInput } from '../report-inputs.js';
import { CONTENT_WIDTH, seriesStyle } from '../style.js';
import { assertSameGrid, difference, exchangeField, maxAbs, periodicPoints } from '../solution-differences.js';
import { sci, sig } from '../format.js';
import type { ReportSection } from './section.js';

const HEIGHT = 300;
const SPLIT = 0.62;

interface Quantity {
  label: string;
  ref: ArrayLike<number>;
  net?: ArrayLike<number>;
}

function overlayFigure(id: string, caption: string, yLabel: string, errorLabel: string, x: ArrayLike<number>, length: number, quantities: Quantity[], networkLabel: string, rgNm?: number): FigureBlock {
  // With Rg in nm (data given in nm), x is drawn in nm and Rg goes on a top axis.
  const k = rgNm ?? 1;
  const points = (xs: ArrayLike<number>, ys: ArrayLike<number>) => periodicPoints(xs, ys, length).map((p) => ({ x: p.x * k, y: p.y }));
  const xLabel = rgNm ? 'x / nm' : 'x / Rg';
  const topAxis = rgNm ? { label: 'x / Rg', scale: 1 / rgNm } : undefined;
  const hasNet = quantities.some((q) => q.net);
  return {
    type: 'figure',
    id,
    width: CONTENT_WIDTH,
    height: hasNet ? HEIGHT : HEIGHT * SPLIT + 20,
    caption,
    draw(region) {
      const series: LineSeries[] = [];
      quantities.forEach((q, k) => {
        // Reference: lines (solid black, then dotted blue); network: markers of other shapes, no line.
        series.push({ label: `${q.label} reference`, points: points(x, q.ref), style: seriesStyle(k === 0 ? 0 : 2) });
        if (q.net) series.push({ label: `${q.label} ${networkLabel}`, points: points(x, q.net), style: seriesStyle(k === 0 ? 1 : 3), line: false, markers: true });
      });
      const topH = hasNet ? region.height * SPLIT : region.height;
      drawInSubRegion(region, 0, 0, region.width, topH, (r) => drawLineChart(r, { series, xLabel, yLabel, legend: true, xMin: 0, xMax: length * k, topAxis }));
      if (!hasNet) return;
      const errors: LineSeries[] = quantities
        .filter((q) => q.net)
        .map((q, k) => ({ label: `${q.label}: ${networkLabel} − reference`, points: points(x, difference(q.net!, q.ref)), style: seriesStyle(k === 0 ? 1 : 3), markers: true }));
      drawInSubRegion(region, 0, topH, region.width, region.height - topH, (r) =>
        drawLineChart(r, { series: errors, xLabel, yLabel: errorLabel, legend: true, xMin: 0, xMax: length * k, guides: [{ axis: 'y', value: 0, style: 0 }] }),
      );
    },
  };
}

function profilesPage(p: ProfileInput): ReportPage {
  const ref = p.reference;
  const net = p.network;
  const label = p.networkLabel ?? 'network';
  if (net) assertSameGrid(ref, net, 'profiles');
  const errPhi = net ? `max |ΔφA| = ${sci(maxAbs(difference(net.phi.A, ref.phi.A)))}, max |ΔφB| = ${sci(maxAbs(difference(net.phi.B, ref.phi.B)))}.` : 'No network solution in this run: reference only.';
  const dw = net ? maxAbs(difference(exchangeField(net), exchangeField(ref))) : undefined;
  return {
    heading: 'Density and field profiles',
    blocks: [
      overlayFigure(
        'profiles-phi',
        `Figure: volume fractions φA(x), φB(x) over the cell (length ${p.rgNm ? `${sig(ref.length * p.rgNm, 4)} nm = ` : ''}${sig(ref.length, 5)} Rg, ${ref.nx} grid points). ${errPhi}`,
        'volume fraction φ (–)',
        'Δφ (–)',
        ref.x,
        ref.length,
        [
          { label: 'φA', ref: ref.phi.A, net: net?.phi.A },
          { label: 'φB', ref: ref.phi.B, net: net?.phi.B },
        ],
        label,
        p.rgNm,
      ),
      overlayFigure(
        'profiles-exchange-field',
        `Figure: exchange field wA − wB (kT); the pressure-like part (wA + wB)/2 is a gauge and is not shown. ${dw !== undefined ? `max |Δ(wA − wB)| = ${sci(dw)} kT.` : ''}`,
        'wA − wB (kT)',
        'Δ(wA − wB) (kT)',
        ref.x,
        ref.length,
        [{ label: 'wA − wB', ref: exchangeField(ref), net: net ? exchangeField(net) : undefined }],
        label,
        p.rgNm,
      ),
    ],
  };
}

export const profilesSection: ReportSection = {
  id: 'profiles',
  pages: (input: ReportInput) => (input.profiles ? [profilesPage(input.profiles)] : []),
};

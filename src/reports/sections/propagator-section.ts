/**
 * The forward propagator q(x, s) as heat maps: reference and network side by side on one
 * colour scale, and their difference on a diverging scale. A run without a network shows
 * q and q† of the reference instead.
 */
import type { FigureBlock, ReportPage } from '../document.js';
import { drawHeatMap, valueRange } from '../charts/heat-map.js';
import type { HeatMapSpec } from '../charts/heat-map.js';
import { drawInSubRegion } from '../region.js';
import type { PropagatorInput, ReportInput } from '../report-inputs.js';
import { CONTENT_WIDTH } from '../style.js';
import { assertSameGrid, difference, maxAbs } from '../solution-differences.js';
import { InputError } from '../../io/errors.js';
import { sci } from '../format.js';
import type { ScftSolution } from '../../physics/result.js';
import type { ReportSection } from './section.js';

const PANEL_H = 215;

function propagatorsOf(sol: ScftSolution, who: string): NonNullable<ScftSolution['propagators']> {
  const p = sol.propagators;
  if (!p) throw new InputError(`propagators: the ${who} solution holds no propagators (solve with --propagators)`);
  return p;
}

/** A film's grid points are cell centres between walls: its map fills [0, H] exactly, with no periodic repeat. */
function filmBox(sol: ScftSolution): Partial<HeatMapSpec> {
  return sol.cell.kind === 'film' ? { box: { x: [0, sol.length], y: [0, 1] }, xLabel: 'depth z / Rg' } : {};
}

function gridFigure(id: string, caption: string, panels: HeatMapSpec[]): FigureBlock {
  // Three panels sit in one row: a 2 × 2 grid would leave one slot empty.
  const cols = panels.length === 3 ? 3 : 2;
  const rows = Math.ceil(panels.length / cols);
  return {
    type: 'figure',
    id,
    width: CONTENT_WIDTH,
    height: rows * PANEL_H,
    caption,
    draw(region) {
      const w = region.width / cols;
      panels.forEach((p, i) => drawInSubRegion(region, (i % cols) * w, Math.floor(i / cols) * PANEL_H, w - 6, PANEL_H - 8, (r) => drawHeatMap(r, p)));
    },
  };
}

function propagatorPage(p: PropagatorInput): ReportPage {
  const ref = p.reference;
  const rq = propagatorsOf(ref, 'reference');
  if (!p.network) {
    const [lo1, hi1] = valueRange(rq.q);
    const [lo2, hi2] = valueRange(rq.qDagger);
    const range: [number, number] = [Math.min(lo1, lo2), Math.max(hi1, hi2)];
    return {
      heading: 'Chain propagators',
      blocks: [
        gridFigure('propagators', `Figure: reference propagators q(x, s) (from the s = 0 end) and q†(x, s) (from the s = 1 end), on one colour scale; ${rq.s.length - 1} contour steps, ${ref.nx} grid points.`, [
          { title: 'q(x, s), reference', rows: rq.q, length: ref.length, map: 'sequential', range, colourBarLabel: 'q (–)', ...filmBox(ref) },
          { title: 'q†(x, s), reference', rows: rq.qDagger, length: ref.length, map: 'sequential', range, colourBarLabel: 'q† (–)', ...filmBox(ref) },
        ]),
      ],
    };
  }
  const net = p.network;
  assertSameGrid(ref, net, 'propagators');
  const nq = propagatorsOf(net, p.networkLabel ?? 'network');
  if (nq.q.length !== rq.q.length) {
    throw new InputError(`propagators: the network has ${nq.q.length} contour points but the reference has ${rq.q.length}; compare them on the same contour grid`);
  }
  const label = p.networkLabel ?? 'network';
  const [lo1, hi1] = valueRange(rq.q);
  const [lo2, hi2] = valueRange(nq.q);
  const range: [number, number] = [Math.min(lo1, lo2), Math.max(hi1, hi2)];
  const diff = nq.q.map((row, i) => difference(row, rq.q[i]));
  const worst = Math.max(...diff.map(maxAbs));
  // The fourth panel (no empty slot in the 2 × 2 grid): the q† difference, when the network has q†.
  const diffDagger = nq.qDagger.length === rq.qDagger.length ? nq.qDagger.map((row, i) => difference(row, rq.qDagger[i])) : null;
  return {
    heading: 'Chain propagators',
    blocks: [
      gridFigure('propagators', `Figure: forward propagator q(x, s), reference and ${label} on one colour scale, and their differences (${label} − reference, diverging scale centred on 0)${diffDagger ? ' for q and q†' : ''}; max |Δq| = ${sci(worst)}.`, [
        { title: 'q(x, s), reference', rows: rq.q, length: ref.length, map: 'sequential', range, colourBarLabel: 'q (–)', ...filmBox(ref) },
        { title: `q(x, s), ${label}`, rows: nq.q, length: ref.length, map: 'sequential', range, colourBarLabel: 'q (–)', ...filmBox(ref) },
        { title: `q difference, ${label} − reference`, rows: diff, length: ref.length, map: 'diverging', colourBarLabel: 'Δq (–)', ...filmBox(ref) },
        ...(diffDagger ? [{ title: `q† difference, ${label} − reference`, rows: diffDagger, length: ref.length, map: 'diverging' as const, colourBarLabel: 'Δq† (–)', ...filmBox(ref) }] : []),
      ]),
    ],
  };
}

export const propagatorSection: ReportSection = {
  id: 'propagators',
  pages: (input: ReportInput) => (input.propagators ? [propagatorPage(input.propagators)] : []),
};

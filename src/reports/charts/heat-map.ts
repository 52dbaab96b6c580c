/**
 * q(x, s) as a heat map with its colour bar, drawn straight onto the canvas (chart.js has
 * no matrix chart). Cells are grid values: column j is centred on x_j, row i on s_i; the
 * periodic column x = L repeats x = 0. The raster is embedded unsmoothed so every cell
 * shows its own value.
 */
import { createCanvas } from 'canvas';
import type { Region } from '../region.js';
import { FONT_FAMILY, TEXT } from '../style.js';
import { divergingColour, sequentialColour } from '../colour-maps.js';
import type { Rgb } from '../colour-maps.js';
import { formatTick, niceTicks } from './ticks.js';

export interface HeatMapSpec {
  title: string;
  /** rows[i][j] = value at contour point s_i (i = 0..ns) and grid point x_j. */
  rows: ArrayLike<number>[];
  /** Cell length L in Rg (x from 0 to L). */
  length: number;
  map: 'sequential' | 'diverging';
  /** Colour range; diverging maps are symmetric about 0 (default ±max |value|). */
  range?: [number, number];
  colourBarLabel: string;
  xLabel?: string;
  yLabel?: string;
  /**
   * A map over a box instead of a periodic cell: rows[i][j] fills the i-th of rows.length
   * equal bands of y (rows[0] at the bottom, y[0]) and the j-th of equal bands of x, exactly
   * covering [x[0], x[1]] × [y[0], y[1]] (no periodic repeat; `length` unused).
   */
  box?: { x: [number, number]; y: [number, number] };
}

export function valueRange(rows: ArrayLike<number>[]): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  for (const r of rows) for (let j = 0; j < r.length; j++) {
    if (r[j] < lo) lo = r[j];
    if (r[j] > hi) hi = r[j];
  }
  return [lo, hi];
}

function colourRange(spec: HeatMapSpec): [number, number] {
  if (spec.range) return spec.range;
  const [lo, hi] = valueRange(spec.rows);
  if (spec.map === 'diverging') {
    const m = Math.max(Math.abs(lo), Math.abs(hi)) || 1;
    return [-m, m];
  }
  return hi > lo ? [lo, hi] : [lo - 0.5, lo + 0.5];
}

function colourOf(spec: HeatMapSpec, range: [number, number], v: number): Rgb {
  const t = (v - range[0]) / (range[1] - range[0]);
  return spec.map === 'diverging' ? divergingColour(2 * t - 1) : sequentialColour(t);
}

const LEFT = 40;
const RIGHT = 62;
const TOP = 18;
const BOTTOM = 30;

export function drawHeatMap(region: Region, spec: HeatMapSpec): void {
  const { ctx } = region;
  const ns = spec.rows.length - 1;
  const nx = spec.rows[0].length;
  const range = colourRange(spec);
  const plotW = region.width - LEFT - RIGHT;
  const plotH = region.height - TOP - BOTTOM;
  const box = spec.box;
  // Raster: a periodic cell repeats x = 0 as a last column, centred on the grid points; a box fills its cells exactly.
  const cols = box ? nx : nx + 1;
  const img = createCanvas(cols, ns + 1);
  const ictx = img.getContext('2d');
  const data = ictx.createImageData(cols, ns + 1);
  for (let r = 0; r <= ns; r++) {
    const row = spec.rows[ns - r];
    for (let j = 0; j < cols; j++) {
      const [R, G, B] = colourOf(spec, range, row[j % nx]);
      const k = 4 * (r * cols + j);
      data.data[k] = R;
      data.data[k + 1] = G;
      data.data[k + 2] = B;
      data.data[k + 3] = 255;
    }
  }
  ictx.putImageData(data, 0, 0);

  ctx.save();
  ctx.beginPath();
  ctx.rect(LEFT, TOP, plotW, plotH);
  ctx.clip();
  ctx.imageSmoothingEnabled = false;
  if (box) ctx.drawImage(img, LEFT, TOP, plotW, plotH);
  else {
    const dxPix = plotW / nx;
    const dsPix = plotH / ns;
    ctx.drawImage(img, LEFT - dxPix / 2, TOP - dsPix / 2, plotW + dxPix, plotH + dsPix);
  }
  ctx.restore();

  ctx.save();
  ctx.strokeStyle = '#000000';
  ctx.lineWidth = 0.8;
  ctx.strokeRect(LEFT, TOP, plotW, plotH);
  ctx.fillStyle = '#000000';
  ctx.font = `bold ${TEXT.body}px "${FONT_FAMILY}"`;
  ctx.textAlign = 'left';
  ctx.textBaseline = 'top';
  ctx.fillText(spec.title, 2, 2);

  ctx.font = `${TEXT.tick}px "${FONT_FAMILY}"`;
  const [x0, x1] = box?.x ?? [0, spec.length];
  const [y0, y1] = box?.y ?? [0, 1];
  const xt = niceTicks(x0, x1, 4);
  ctx.textAlign = 'center';
  ctx.textBaseline = 'top';
  for (const v of xt) {
    const px = LEFT + ((v - x0) / (x1 - x0)) * plotW;
    ctx.beginPath();
    ctx.moveTo(px, TOP + plotH);
    ctx.lineTo(px, TOP + plotH + 3);
    ctx.stroke();
    ctx.fillText(formatTick(v, xt), px, TOP + plotH + 4);
  }
  const st = niceTicks(y0, y1, 4);
  ctx.textAlign = 'right';
  ctx.textBaseline = 'middle';
  for (const v of st) {
    const py = TOP + plotH - ((v - y0) / (y1 - y0)) * plotH;
    ctx.beginPath();
    ctx.moveTo(LEFT - 3, py);
    ctx.lineTo(LEFT, py);
    ctx.stroke();
    ctx.fillText(formatTick(v, st), LEFT - 4, py);
  }
  ctx.font = `${TEXT.axis}px "${FONT_FAMILY}"`;
  ctx.textAlign = 'center';
  ctx.textBaseline = 'bottom';
  ctx.fillText(spec.xLabel ?? 'x / Rg', LEFT + plotW / 2, region.height - 1);
  ctx.save();
  ctx.translate(10, TOP + plotH / 2);
  ctx.rotate(-Math.PI / 2);
  ctx.textBaseline = 'middle';
  ctx.fillText(spec.yLabel ?? 'contour s', 0, 0);
  ctx.restore();

  // Colour bar.
  const barX = LEFT + plotW + 8;
  const barW = 9;
  const bar = createCanvas(1, 256);
  const bctx = bar.getContext('2d');
  const bd = bctx.createImageData(1, 256);
  for (let r = 0; r < 256; r++) {
    const v = range[1] - (r / 255) * (range[1] - range[0]);
    const [R, G, B] = colourOf(spec, range, v);
    bd.data.set([R, G, B, 255], 4 * r);
  }
  bctx.putImageData(bd, 0, 0);
  ctx.imageSmoothingEnabled = false;
  ctx.drawImage(bar, barX, TOP, barW, plotH);
  ctx.strokeRect(barX, TOP, barW, plotH);
  const bt = niceTicks(range[0], range[1], 4);
  ctx.font = `${TEXT.tick}px "${FONT_FAMILY}"`;
  ctx.textAlign = 'left';
  ctx.textBaseline = 'middle';
  for (const v of bt) {
    const py = TOP + plotH - ((v - range[0]) / (range[1] - range[0])) * plotH;
    ctx.beginPath();
    ctx.moveTo(barX + barW, py);
    ctx.lineTo(barX + barW + 3, py);
    ctx.stroke();
    ctx.fillText(formatTick(v, bt), barX + barW + 4, py);
  }
  ctx.font = `${TEXT.small}px "${FONT_FAMILY}"`;
  ctx.save();
  ctx.translate(region.width - 5, TOP + plotH / 2);
  ctx.rotate(-Math.PI / 2);
  ctx.textAlign = 'center';
  ctx.textBaseline = 'bottom';
  ctx.fillText(spec.colourBarLabel, 0, 0);
  ctx.restore();
  ctx.restore();
}

/** Legend drawn by hand, so every entry shows its colour, dash pattern and marker together. */
import type { CanvasRenderingContext2D } from 'canvas';
import type { SeriesStyle } from '../style.js';
import { FONT_FAMILY, TEXT } from '../style.js';

export function drawMarker(ctx: CanvasRenderingContext2D, shape: SeriesStyle['marker'], x: number, y: number, r: number, colour: string): void {
  ctx.save();
  ctx.strokeStyle = colour;
  ctx.fillStyle = colour;
  ctx.lineWidth = 1;
  ctx.setLineDash([]);
  ctx.beginPath();
  switch (shape) {
    case 'circle':
      ctx.arc(x, y, r, 0, 2 * Math.PI);
      break;
    case 'rect':
      ctx.rect(x - r * 0.85, y - r * 0.85, 1.7 * r, 1.7 * r);
      break;
    case 'triangle':
      ctx.moveTo(x, y - r * 1.1);
      ctx.lineTo(x + r, y + r * 0.75);
      ctx.lineTo(x - r, y + r * 0.75);
      ctx.closePath();
      break;
    case 'rectRot':
      ctx.moveTo(x, y - r * 1.15);
      ctx.lineTo(x + r * 1.15, y);
      ctx.lineTo(x, y + r * 1.15);
      ctx.lineTo(x - r * 1.15, y);
      ctx.closePath();
      break;
    case 'crossRot':
    case 'star':
      ctx.moveTo(x - r, y - r);
      ctx.lineTo(x + r, y + r);
      ctx.moveTo(x + r, y - r);
      ctx.lineTo(x - r, y + r);
      if (shape === 'star') {
        ctx.moveTo(x, y - r * 1.2);
        ctx.lineTo(x, y + r * 1.2);
      }
      ctx.stroke();
      ctx.restore();
      return;
  }
  ctx.fill();
  ctx.restore();
}

export interface LegendEntry {
  label: string;
  style: SeriesStyle;
  line: boolean;
  marker: boolean;
}

/** Rows of entries starting at (x, y) (y is the first row's text middle); returns the total height. */
export function drawLegend(ctx: CanvasRenderingContext2D, entries: LegendEntry[], x: number, y: number, maxWidth: number, measureOnly = false): number {
  ctx.save();
  ctx.font = `${TEXT.small}px "${FONT_FAMILY}"`;
  ctx.textBaseline = 'middle';
  ctx.textAlign = 'left';
  let cx = x;
  let cy = y;
  const rowHeight = TEXT.small + 5;
  for (const e of entries) {
    const w = 26 + ctx.measureText(e.label).width + 12;
    if (cx + w > x + maxWidth && cx > x) {
      cx = x;
      cy += rowHeight;
    }
    if (measureOnly) {
      cx += w;
      continue;
    }
    if (e.line) {
      ctx.strokeStyle = e.style.colour;
      ctx.lineWidth = 1.4;
      ctx.setLineDash(e.style.dash);
      ctx.beginPath();
      ctx.moveTo(cx, cy);
      ctx.lineTo(cx + 22, cy);
      ctx.stroke();
      ctx.setLineDash([]);
    }
    if (e.marker) drawMarker(ctx, e.style.marker, cx + 11, cy, 2.6, e.style.colour);
    ctx.fillStyle = '#000000';
    ctx.fillText(e.label, cx + 26, cy);
    cx += w;
  }
  ctx.restore();
  return cy - y + rowHeight;
}

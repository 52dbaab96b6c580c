/**
 * Each figure of the report as its own PNG at a given DPI: the figure's size in points
 * (plus a 6 pt border) times dpi / 72, white background, the resolution recorded in the PNG's pHYs chunk.
 * node-canvas writes no time chunk, so the same figure gives the same bytes.
 */
import { createCanvas } from 'canvas';
import type { FigureBlock, ReportDocument } from './document.js';
import { figuresOf } from './document.js';
import { drawInRegion } from './region.js';

/** White border around each PNG figure, in points. */
export const PNG_PADDING = 6;

export function pngSize(figure: Pick<FigureBlock, 'width' | 'height'>, dpi: number): { width: number; height: number } {
  return { width: Math.round(((figure.width + 2 * PNG_PADDING) * dpi) / 72), height: Math.round(((figure.height + 2 * PNG_PADDING) * dpi) / 72) };
}

export function renderFigurePng(figure: FigureBlock, dpi: number): Buffer {
  const { width, height } = pngSize(figure, dpi);
  const canvas = createCanvas(width, height);
  const ctx = canvas.getContext('2d');
  ctx.fillStyle = '#ffffff';
  ctx.fillRect(0, 0, width, height);
  drawInRegion(ctx, PNG_PADDING, PNG_PADDING, figure.width, figure.height, dpi / 72, figure.draw);
  return canvas.toBuffer('image/png', { resolution: dpi });
}

/** File name → PNG bytes, one per figure. */
export function renderPngs(doc: ReportDocument, dpi: number): Record<string, Buffer> {
  const out: Record<string, Buffer> = {};
  for (const f of figuresOf(doc)) out[`${f.id}.png`] = renderFigurePng(f, dpi);
  return out;
}

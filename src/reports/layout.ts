/**
 * Text and table blocks on a page, and how tall each block is, so the PDF renderer can
 * stack blocks and start a new page when one does not fit.
 */
import type { CanvasRenderingContext2D } from 'canvas';
import type { Block, TableBlock, TextBlock } from './document.js';
import { FONT_FAMILY, TEXT } from './style.js';

const FONTS = {
  body: { size: TEXT.body, font: `${TEXT.body}px "${FONT_FAMILY}"`, lead: TEXT.body * 1.4 },
  heading: { size: TEXT.heading, font: `bold ${TEXT.heading}px "${FONT_FAMILY}"`, lead: TEXT.heading * 1.5 },
  mono: { size: TEXT.small, font: `${TEXT.small}px "DejaVu Sans Mono"`, lead: TEXT.small * 1.4 },
  small: { size: TEXT.small, font: `${TEXT.small}px "${FONT_FAMILY}"`, lead: TEXT.small * 1.4 },
} as const;

export const BLOCK_GAP = 10;
const TABLE_ROW = TEXT.small * 1.75;
const CAPTION_LEAD = TEXT.small * 1.35;

/**
 * Widths already measured, per drawing context and font. Pagination asks for each block's
 * height several times (the block, the heading kept with it, the table split) and drawing
 * wraps it once more, and each measureText is a call into the text shaper: a PDF report spent
 * most of its layout time measuring the same strings again. The width of a string in a font
 * on a context does not change, so the cache gives the same numbers.
 */
const measured = new WeakMap<CanvasRenderingContext2D, Map<string, number>>();

/** ctx.measureText(text).width in ctx's current font, measured once per context, font and text. */
export function textWidth(ctx: CanvasRenderingContext2D, text: string): number {
  let widths = measured.get(ctx);
  if (!widths) measured.set(ctx, (widths = new Map()));
  const key = `${ctx.font}\u0000${text}`;
  let w = widths.get(key);
  if (w === undefined) widths.set(key, (w = ctx.measureText(text).width));
  return w;
}

/** Greedy word wrap to a width. */
export function wrapText(ctx: CanvasRenderingContext2D, text: string, width: number): string[] {
  const words = text.split(' ');
  const out: string[] = [];
  let line = '';
  for (const w of words) {
    const trial = line ? `${line} ${w}` : w;
    if (line && textWidth(ctx, trial) > width) {
      out.push(line);
      line = w;
    } else line = trial;
  }
  out.push(line);
  return out;
}

function textLines(ctx: CanvasRenderingContext2D, b: TextBlock, width: number): string[] {
  const f = FONTS[b.style ?? 'body'];
  ctx.save();
  ctx.font = f.font;
  const lines = b.style === 'mono' ? b.lines : b.lines.flatMap((l) => wrapText(ctx, l, width));
  ctx.restore();
  return lines;
}

export function captionLines(ctx: CanvasRenderingContext2D, caption: string, width: number): string[] {
  ctx.save();
  ctx.font = FONTS.small.font;
  const lines = wrapText(ctx, caption, width);
  ctx.restore();
  return lines;
}

export function blockHeight(ctx: CanvasRenderingContext2D, b: Block, width: number): number {
  switch (b.type) {
    case 'text':
      return textLines(ctx, b, width).length * FONTS[b.style ?? 'body'].lead;
    case 'table':
      return tableRowHeights(ctx, b, width).reduce((a, h) => a + h, 0) + 2;
    case 'figure':
      return b.height + 3 + captionLines(ctx, b.caption, width).length * CAPTION_LEAD;
  }
}

export function drawText(ctx: CanvasRenderingContext2D, b: TextBlock, x: number, y: number, width: number): void {
  const f = FONTS[b.style ?? 'body'];
  ctx.save();
  ctx.font = f.font;
  ctx.fillStyle = '#000000';
  ctx.textAlign = 'left';
  ctx.textBaseline = 'alphabetic';
  textLines(ctx, b, width).forEach((l, i) => ctx.fillText(l, x, y + (i + 1) * f.lead - (f.lead - f.size) / 2 - 1));
  ctx.restore();
}

export function drawCaption(ctx: CanvasRenderingContext2D, caption: string, x: number, y: number, width: number): void {
  ctx.save();
  ctx.font = FONTS.small.font;
  ctx.fillStyle = '#000000';
  ctx.textAlign = 'left';
  ctx.textBaseline = 'top';
  captionLines(ctx, caption, width).forEach((l, i) => ctx.fillText(l, x, y + i * CAPTION_LEAD));
  ctx.restore();
}

const CELL_LEAD = TEXT.small * 1.25;

function columnWidths(b: TableBlock, width: number): number[] {
  const rel = b.widths ?? b.header.map(() => 1);
  const total = rel.reduce((a, c) => a + c, 0);
  return rel.map((r) => (r / total) * width);
}

/**
 * Each cell's lines: long text wraps inside its column, and a single word too long for it (a
 * dotted setting name) is broken after a '.' or '/' where it can be, else between characters:
 * nothing is cut off, so every setting name in the appendix stays readable in full.
 */
export function cellLines(ctx: CanvasRenderingContext2D, text: string, w: number, bold: boolean): string[] {
  // A table's heights are asked for several times while paginating (see textWidth): its cells are wrapped once.
  let done = wrappedCells.get(ctx);
  if (!done) wrappedCells.set(ctx, (done = new Map()));
  const key = `${bold ? 'b' : ''}${w}\u0000${text}`;
  const known = done.get(key);
  if (known) return known;
  const lines = wrapCell(ctx, text, w, bold);
  done.set(key, lines);
  return lines;
}
const wrappedCells = new WeakMap<CanvasRenderingContext2D, Map<string, string[]>>();

function wrapCell(ctx: CanvasRenderingContext2D, text: string, w: number, bold: boolean): string[] {
  ctx.save();
  ctx.font = `${bold ? 'bold ' : ''}${TEXT.small}px "${FONT_FAMILY}"`;
  const lines = wrapText(ctx, text, w - 6).flatMap((l) => breakToWidth(ctx, l, w - 6));
  ctx.restore();
  return lines;
}

/** A line wider than `width` in pieces that fit: the longest prefix that fits, cut after its last '.' or '/' if it has one. */
function breakToWidth(ctx: CanvasRenderingContext2D, line: string, width: number): string[] {
  const out: string[] = [];
  let rest = line;
  while (rest.length > 1 && textWidth(ctx, rest) > width) {
    let n = rest.length - 1;
    while (n > 1 && textWidth(ctx, rest.slice(0, n)) > width) n--;
    const head = rest.slice(0, n);
    const cut = Math.max(head.lastIndexOf('.'), head.lastIndexOf('/'));
    const at = cut > 0 ? cut + 1 : n;
    out.push(rest.slice(0, at));
    rest = rest.slice(at);
  }
  out.push(rest);
  return out;
}

/** Header first, then one height per row: one line's row, plus a line's lead per extra wrapped line. */
export function tableRowHeights(ctx: CanvasRenderingContext2D, b: TableBlock, width: number): number[] {
  const cols = columnWidths(b, width);
  return [b.header, ...b.rows].map((cells, r) => TABLE_ROW + (Math.max(1, ...cells.map((c, i) => cellLines(ctx, c, cols[i] ?? 0, r === 0).length)) - 1) * CELL_LEAD);
}

export function drawTable(ctx: CanvasRenderingContext2D, b: TableBlock, x: number, y: number, width: number): void {
  const cols = columnWidths(b, width);
  const heights = tableRowHeights(ctx, b, width);
  const right = new Set(b.alignRight ?? []);
  ctx.save();
  ctx.fillStyle = '#000000';
  ctx.strokeStyle = '#000000';
  ctx.textBaseline = 'middle';
  const row = (cells: string[], yy: number, bold: boolean): void => {
    let cx = x;
    cells.forEach((c, i) => {
      const w = cols[i] ?? 0;
      const lines = cellLines(ctx, c, w, bold);
      ctx.font = `${bold ? 'bold ' : ''}${TEXT.small}px "${FONT_FAMILY}"`;
      ctx.textAlign = right.has(i) ? 'right' : 'left';
      lines.forEach((l, k) => ctx.fillText(l, right.has(i) ? cx + w - 3 : cx + 3, yy + TABLE_ROW / 2 + k * CELL_LEAD));
      cx += w;
    });
  };
  let yy = y;
  row(b.header, yy, true);
  ctx.lineWidth = 0.8;
  ctx.beginPath();
  ctx.moveTo(x, y);
  ctx.lineTo(x + width, y);
  ctx.moveTo(x, y + heights[0]);
  ctx.lineTo(x + width, y + heights[0]);
  ctx.stroke();
  yy += heights[0];
  b.rows.forEach((r, i) => {
    row(r, yy, false);
    yy += heights[i + 1];
  });
  ctx.beginPath();
  ctx.moveTo(x, yy);
  ctx.lineTo(x + width, yy);
  ctx.stroke();
  ctx.restore();
}

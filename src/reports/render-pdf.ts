/**
 * The report as a multi-page A4 PDF: vector charts and real text (cairo's PDF surface
 * through node-canvas, with text drawn as glyphs so it can be searched and extracted).
 *
 * Deterministic: the same document gives the same bytes. cairo stamps the current time as
 * CreationDate unless told otherwise (checked: a bare canvas.toBuffer('application/pdf')
 * carries the clock time), so the run's own date is passed in; no ModDate is written.
 */
import { createCanvas } from 'canvas';
import type { CanvasRenderingContext2D } from 'canvas';
import type { ReportDocument, ReportPage } from './document.js';
import { BLOCK_GAP, blockHeight, drawCaption, drawTable, drawText } from './layout.js';
import { drawInRegion } from './region.js';
import { A4, CONTENT_WIDTH, FONT_FAMILY, MARGIN, TEXT } from './style.js';
import { mesofieldVersion } from '../io/versions.js';

const FOOTER = 24;
const HEADING = TEXT.heading * 2;

function drawHeading(ctx: CanvasRenderingContext2D, text: string): void {
  ctx.save();
  ctx.font = `bold ${TEXT.heading}px "${FONT_FAMILY}"`;
  ctx.fillStyle = '#000000';
  ctx.textBaseline = 'alphabetic';
  ctx.textAlign = 'left';
  ctx.fillText(text, MARGIN, MARGIN + TEXT.heading);
  ctx.restore();
}

function drawFooter(ctx: CanvasRenderingContext2D, doc: ReportDocument, page: number, pages: number): void {
  ctx.save();
  ctx.font = `${TEXT.small}px "${FONT_FAMILY}"`;
  ctx.fillStyle = '#444444';
  ctx.textBaseline = 'alphabetic';
  ctx.textAlign = 'left';
  ctx.fillText(doc.title, MARGIN, A4.height - FOOTER + 4);
  ctx.textAlign = 'right';
  ctx.fillText(`page ${page} of ${pages}`, A4.width - MARGIN, A4.height - FOOTER + 4);
  ctx.restore();
}

interface PlacedBlock {
  block: ReportPage['blocks'][number];
  y: number;
}

/** A table taller than a whole page is cut into consecutive tables that each fit (header repeated). */
export function splitTallTables(ctx: CanvasRenderingContext2D, blocks: ReportPage['blocks'], pageHeight: number): ReportPage['blocks'] {
  const out: ReportPage['blocks'] = [];
  for (const block of blocks) {
    if (block.type !== 'table' || blockHeight(ctx, block, CONTENT_WIDTH) <= pageHeight) {
      out.push(block);
      continue;
    }
    let rest = block.rows;
    while (rest.length > 0) {
      let n = rest.length;
      while (n > 1 && blockHeight(ctx, { ...block, rows: rest.slice(0, n) }, CONTENT_WIDTH) > pageHeight) n = Math.floor(n * 0.9);
      out.push({ ...block, rows: rest.slice(0, n) });
      rest = rest.slice(n);
    }
  }
  return out;
}

const isHeading = (b: ReportPage['blocks'][number] | undefined): boolean => b?.type === 'text' && b.style === 'heading';

/** Height of block i and, when it is a heading, of everything it must stay with (the next headings and the first block after them). */
function keptHeight(ctx: CanvasRenderingContext2D, blocks: ReportPage['blocks'], i: number): number {
  let h = blockHeight(ctx, blocks[i], CONTENT_WIDTH);
  for (let k = i; isHeading(blocks[k]) && blocks[k + 1]; k++) h += BLOCK_GAP + blockHeight(ctx, blocks[k + 1], CONTENT_WIDTH);
  return h;
}

/** Stack blocks top to bottom; a block that does not fit starts a continuation page. */
function paginate(ctx: CanvasRenderingContext2D, doc: ReportDocument): { heading: string; placed: PlacedBlock[] }[] {
  const out: { heading: string; placed: PlacedBlock[] }[] = [];
  const bottom = A4.height - MARGIN - FOOTER + 10;
  let y = 0;
  for (const page of doc.pages) {
    let current: { heading: string; placed: PlacedBlock[] };
    let blocks = splitTallTables(ctx, page.blocks, bottom - (MARGIN + HEADING));
    const prev = out[out.length - 1];
    const first = blocks[0] ? keptHeight(ctx, blocks, 0) : 0;
    if (page.flow && prev && y + HEADING + first <= bottom) {
      // Continue on the previous page: the page heading becomes a heading block there.
      current = prev;
      blocks = [{ type: 'text', lines: [page.heading], style: 'heading' }, ...blocks];
      y += BLOCK_GAP;
    } else {
      current = { heading: page.heading, placed: [] as PlacedBlock[] };
      out.push(current);
      y = MARGIN + HEADING;
    }
    blocks.forEach((block, i) => {
      const h = blockHeight(ctx, block, CONTENT_WIDTH);
      // A heading stays with what it heads: it moves to the next page when that block does
      // (a block that does not fit starts a new page whole, so the heading goes with it).
      const needed = keptHeight(ctx, blocks, i);
      if (y + needed > bottom && current.placed.length > 0) {
        current = { heading: `${page.heading} (continued)`, placed: [] };
        out.push(current);
        y = MARGIN + HEADING;
      }
      current.placed.push({ block, y });
      y += h + BLOCK_GAP;
    });
  }
  return out;
}

export function renderPdf(doc: ReportDocument): Buffer {
  const canvas = createCanvas(A4.width, A4.height, 'pdf');
  const ctx = canvas.getContext('2d');
  ctx.textDrawingMode = 'glyph';
  const pages = paginate(ctx, doc);
  pages.forEach((page, i) => {
    if (i > 0) ctx.addPage(A4.width, A4.height);
    ctx.textDrawingMode = 'glyph';
    drawHeading(ctx, page.heading);
    for (const { block, y } of page.placed) {
      if (block.type === 'text') drawText(ctx, block, MARGIN, y, CONTENT_WIDTH);
      else if (block.type === 'table') drawTable(ctx, block, MARGIN, y, CONTENT_WIDTH);
      else {
        const x = MARGIN + (CONTENT_WIDTH - block.width) / 2;
        drawInRegion(ctx, x, y, block.width, block.height, 1, block.draw);
        drawCaption(ctx, block.caption, MARGIN, y + block.height + 3, CONTENT_WIDTH);
      }
    }
    drawFooter(ctx, doc, i + 1, pages.length);
  });
  return canvas.toBuffer('application/pdf', { title: doc.title, creator: `mesofield ${mesofieldVersion()}`, creationDate: doc.date });
}

/** Pages the PDF will have (layout may add continuation pages). */
export function pdfPageCount(doc: ReportDocument): number {
  const ctx = createCanvas(A4.width, A4.height, 'pdf').getContext('2d');
  return paginate(ctx, doc).length;
}

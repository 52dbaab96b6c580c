import { createCanvas } from 'canvas';
import { describe, expect, it } from 'vitest';
import type { TableBlock } from '../../src/reports/document.js';
import { blockHeight, cellLines, textWidth } from '../../src/reports/layout.js';
import { splitTallTables } from '../../src/reports/render-pdf.js';
import { CONTENT_WIDTH, FONT_FAMILY, TEXT } from '../../src/reports/style.js';

describe('pagination of tall tables', () => {
  it('cuts a table taller than a page into tables that fit, keeping every row in order', () => {
    const ctx = createCanvas(10, 10, 'pdf').getContext('2d') as unknown as CanvasRenderingContext2D;
    const table: TableBlock = { type: 'table', header: ['quantity', 'value'], rows: Array.from({ length: 160 }, (_, i) => [`row ${i}`, String(i * i)]) };
    const pageHeight = 700;
    expect(blockHeight(ctx, table, CONTENT_WIDTH)).toBeGreaterThan(pageHeight);
    const parts = splitTallTables(ctx, [table], pageHeight) as TableBlock[];
    expect(parts.length).toBeGreaterThan(1);
    for (const p of parts) expect(blockHeight(ctx, p, CONTENT_WIDTH)).toBeLessThanOrEqual(pageHeight);
    expect(parts.flatMap((p) => p.rows)).toEqual(table.rows);
    // A table that fits is left whole.
    const small = { ...table, rows: table.rows.slice(0, 5) };
    expect(splitTallTables(ctx, [small], pageHeight)).toEqual([small]);
  });
});

describe('table cells', () => {
  it('break a dotted setting name too long for its column after a dot, keeping every character', () => {
    const ctx = createCanvas(10, 10, 'pdf').getContext('2d') as unknown as CanvasRenderingContext2D;
    ctx.font = `${TEXT.small}px "${FONT_FAMILY}"`; // the font the table's cells are measured in
    const name = 'training.secondOrder.outputLayerIterations';
    // A column wide enough for the longest dotted part, not for the whole name (6 points of padding).
    const width = Math.ceil(Math.max(...['training.', 'secondOrder.', 'outputLayerIterations'].map((p) => textWidth(ctx, p)))) + 7;
    expect(textWidth(ctx, name)).toBeGreaterThan(width - 6);
    const lines = cellLines(ctx, name, width, false);
    expect(lines.length).toBeGreaterThan(1);
    expect(lines.join('')).toBe(name);
    for (const l of lines.slice(0, -1)) expect(l.endsWith('.')).toBe(true); // cut after a dot, not inside a part
    expect(lines[lines.length - 1]).toBe('outputLayerIterations');
    for (const l of lines) expect(textWidth(ctx, l)).toBeLessThanOrEqual(width - 6);
    // A word with no dot is broken between characters, still whole.
    const word = 'x'.repeat(80);
    const pieces = cellLines(ctx, word, width, false);
    expect(pieces.length).toBeGreaterThan(1);
    expect(pieces.join('')).toBe(word);
    for (const l of pieces) expect(textWidth(ctx, l)).toBeLessThanOrEqual(width - 6);
  });
});

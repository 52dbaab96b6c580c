import { createCanvas } from 'canvas';
import { describe, expect, it } from 'vitest';
import type { TableBlock } from '../../src/reports/document.js';
import { blockHeight } from '../../src/reports/layout.js';
import { splitTallTables } from '../../src/reports/render-pdf.js';
import { CONTENT_WIDTH } from '../../src/reports/style.js';

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

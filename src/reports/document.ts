/**
 * The report as data: pages of blocks (figures, text, tables), independent of the output
 * format. Section builders produce these; render-pdf.ts lays them on A4 pages and
 * render-png.ts writes each figure as its own image.
 */
import type { Region } from './region.js';

export interface FigureBlock {
  type: 'figure';
  /** File-name-safe id, unique in the report: the PNG is `<id>.png`. */
  id: string;
  /** Size in points; the PDF places it at this size, the PNG scales it by dpi / 72. */
  width: number;
  height: number;
  caption: string;
  draw: (region: Region) => void;
}

export interface TextBlock {
  type: 'text';
  lines: string[];
  /** 'heading' lines are bold and larger; 'mono' keeps columns aligned. */
  style?: 'body' | 'heading' | 'mono' | 'small';
}

export interface TableBlock {
  type: 'table';
  header: string[];
  rows: string[][];
  /** Relative column widths (default equal). */
  widths?: number[];
  /** Columns to right-align (numbers). */
  alignRight?: number[];
}

export type Block = FigureBlock | TextBlock | TableBlock;

export interface ReportPage {
  heading: string;
  blocks: Block[];
  /** Continue on the previous page (under this heading) when it has room, rather than start a new one: short pages of numbers. */
  flow?: boolean;
}

export interface ReportDocument {
  title: string;
  /** Date printed in the footer and PDF metadata: taken from the run, never the clock. */
  date: Date;
  pages: ReportPage[];
}

export function figuresOf(doc: ReportDocument): FigureBlock[] {
  return doc.pages.flatMap((p) => p.blocks.filter((b): b is FigureBlock => b.type === 'figure'));
}

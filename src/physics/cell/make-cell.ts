/** A cell from its plain description (what files store): the one place that knows every cell kind. */
import type { Cell, CellDescription } from './cell.js';
import { FilmCell } from './film-cell.js';
import { PeriodicCell } from './periodic-cell.js';

export function makeCell(d: CellDescription, field = 'cell'): Cell {
  switch (d.kind) {
    case 'periodic':
      return new PeriodicCell(d.length, d.n, d.periods, field);
    case 'film':
      return new FilmCell(d.length, d.n, d.walls, field);
  }
}

/** A value whose `cell` is replaced by its plain description: what crosses a worker-thread boundary (a Cell holds functions). */
export type Portable<T extends { cell: Cell }> = Omit<T, 'cell'> & { cell: CellDescription };

export function portable<T extends { cell: Cell }>(v: T): Portable<T> {
  return { ...v, cell: v.cell.describe() };
}

export function restored<T extends { cell: Cell }>(v: Portable<T>): T {
  return { ...v, cell: makeCell(v.cell) } as unknown as T;
}

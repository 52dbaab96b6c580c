/**
 * A rectangle of a page (or of a PNG) that a figure draws into in its own coordinates.
 *
 * chart.js draws on "a canvas": it reads the canvas size, calls setTransform for its pixel
 * ratio and clears the canvas before drawing. To place several charts on one PDF page we
 * hand it a stand-in canvas the size of the region, and a context that forwards to the
 * page's context but composes every transform with the region's offset and scale and
 * ignores clears (the page starts white; a clear would erase the other figures).
 */
import type { CanvasRenderingContext2D } from 'canvas';

export interface Region {
  /** Width and height in points (the figure's own coordinates). */
  width: number;
  height: number;
  /** Context in region coordinates; also accepted by chart.js. */
  ctx: CanvasRenderingContext2D;
  /** The stand-in canvas chart.js sizes itself from. */
  canvas: { width: number; height: number; style: Record<string, string>; getContext: () => CanvasRenderingContext2D };
}

export function makeRegion(page: CanvasRenderingContext2D, x0: number, y0: number, width: number, height: number, scale: number): Region {
  const canvas = { width, height, style: {} as Record<string, string>, getContext: () => ctx };
  const overrides: Record<PropertyKey, unknown> = {
    canvas,
    setTransform: (a: number, b: number, c: number, d: number, e: number, f: number) =>
      page.setTransform(a * scale, b * scale, c * scale, d * scale, e * scale + x0 * scale, f * scale + y0 * scale),
    resetTransform: () => page.setTransform(scale, 0, 0, scale, x0 * scale, y0 * scale),
    clearRect: () => undefined,
  };
  const ctx = new Proxy(page, {
    get(target, prop) {
      if (prop in overrides) return overrides[prop];
      const v = (target as unknown as Record<PropertyKey, unknown>)[prop];
      return typeof v === 'function' ? (v as (...a: unknown[]) => unknown).bind(target) : v;
    },
    set(target, prop, value) {
      (target as unknown as Record<PropertyKey, unknown>)[prop] = value;
      return true;
    },
  }) as CanvasRenderingContext2D;
  return { width, height, ctx, canvas };
}

/** Run a drawing in a region with the page state saved and restored around it. */
export function drawInRegion(page: CanvasRenderingContext2D, x0: number, y0: number, width: number, height: number, scale: number, draw: (r: Region) => void): void {
  page.save();
  const region = makeRegion(page, x0, y0, width, height, scale);
  region.ctx.resetTransform();
  try {
    draw(region);
  } finally {
    page.restore();
  }
}

/** A sub-rectangle of a region (panels of one figure), in the region's coordinates. */
export function drawInSubRegion(parent: Region, x0: number, y0: number, width: number, height: number, draw: (r: Region) => void): void {
  drawInRegion(parent.ctx, x0, y0, width, height, 1, draw);
}

/**
 * House style of every figure: Okabe–Ito colours (Okabe & Ito, "Color Universal Design",
 * 2008), each paired with its own dash pattern and marker shape so a curve is still told
 * apart in greyscale print or by a colour-blind reader. Sizes are in PDF points (1/72 in),
 * chosen to stay legible on an A4 page.
 */

export const FONT_FAMILY = 'DejaVu Sans';

export const OKABE_ITO = {
  black: '#000000',
  orange: '#E69F00',
  skyBlue: '#56B4E9',
  bluishGreen: '#009E73',
  yellow: '#F0E442',
  blue: '#0072B2',
  vermillion: '#D55E00',
  reddishPurple: '#CC79A7',
} as const;

export interface SeriesStyle {
  colour: string;
  dash: number[];
  marker: 'circle' | 'rect' | 'triangle' | 'rectRot' | 'crossRot' | 'star';
}

/**
 * Series styles in order of use. Yellow is left out: it vanishes on white paper.
 * The first is the reference (solid black line); the rest differ in colour, dash and marker.
 */
export const SERIES: readonly SeriesStyle[] = [
  { colour: OKABE_ITO.black, dash: [], marker: 'circle' },
  { colour: OKABE_ITO.vermillion, dash: [6, 3], marker: 'triangle' },
  { colour: OKABE_ITO.blue, dash: [2, 2], marker: 'rect' },
  { colour: OKABE_ITO.bluishGreen, dash: [8, 3, 2, 3], marker: 'rectRot' },
  { colour: OKABE_ITO.orange, dash: [12, 4], marker: 'crossRot' },
  { colour: OKABE_ITO.reddishPurple, dash: [4, 2, 1, 2], marker: 'star' },
  { colour: OKABE_ITO.skyBlue, dash: [1, 3], marker: 'circle' },
];

export function seriesStyle(i: number): SeriesStyle {
  return SERIES[i % SERIES.length];
}

export const TEXT = {
  title: 15,
  heading: 12,
  body: 9.5,
  small: 8,
  axis: 8.5,
  tick: 7.5,
} as const;

/** A4 in points. */
export const A4 = { width: 595.28, height: 841.89 } as const;
export const MARGIN = 42;
export const CONTENT_WIDTH = A4.width - 2 * MARGIN;

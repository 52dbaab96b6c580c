/** Colour maps and series styles: checked against colour-science facts and for greyscale legibility. */
import { describe, expect, it } from 'vitest';
import { divergingColour, labToSrgb, sequentialColour, srgbLightness } from '../../src/reports/colour-maps.js';
import { OKABE_ITO, SERIES } from '../../src/reports/style.js';

describe('CIELAB → sRGB', () => {
  it('maps the D65 white and black points and the sRGB primaries (from memory: L*a*b* of sRGB red, green, blue)', () => {
    expect(labToSrgb(100, 0, 0)).toEqual([255, 255, 255]);
    expect(labToSrgb(0, 0, 0)).toEqual([0, 0, 0]);
    const close = (got: number[], want: number[]): void => got.forEach((g, i) => expect(Math.abs(g - want[i])).toBeLessThanOrEqual(1));
    close(labToSrgb(53.24, 80.09, 67.2), [255, 0, 0]);
    close(labToSrgb(87.73, -86.18, 83.18), [0, 255, 0]);
    close(labToSrgb(32.3, 79.19, -107.86), [0, 0, 255]);
  });

  it('inverts to the same lightness: L* of the colour it makes', () => {
    for (const L of [10, 35, 60, 85]) expect(srgbLightness(labToSrgb(L, 0, 0))).toBeCloseTo(L, 0);
  });
});

describe('sequential map', () => {
  const n = 64;
  const Ls = Array.from({ length: n }, (_, i) => srgbLightness(sequentialColour(i / (n - 1))));

  it('rises in lightness monotonically and evenly, so it prints as a grey ramp', () => {
    for (let i = 1; i < n; i++) expect(Ls[i]).toBeGreaterThan(Ls[i - 1]);
    const steps = Ls.slice(1).map((L, i) => L - Ls[i]);
    const mean = (Ls[n - 1] - Ls[0]) / (n - 1);
    // Even to within ±35 % of the mean step (8-bit rounding and gamut clipping allow some spread).
    for (const s of steps) expect(Math.abs(s - mean)).toBeLessThan(0.35 * mean);
    expect(Ls[n - 1] - Ls[0]).toBeGreaterThan(65);
  });

  it('runs from a dark blue-violet to a light yellow, like viridis', () => {
    const [r0, g0, b0] = sequentialColour(0);
    expect(b0).toBeGreaterThan(r0);
    expect(b0).toBeGreaterThan(g0);
    const [r1, g1, b1] = sequentialColour(1);
    expect(r1).toBeGreaterThan(b1 + 60);
    expect(g1).toBeGreaterThan(b1 + 60);
  });
});

describe('diverging map', () => {
  it('is near-white at 0, with lightness symmetric about it, blue below and red above', () => {
    expect(srgbLightness(divergingColour(0))).toBeGreaterThan(95);
    for (const t of [0.25, 0.5, 1]) expect(srgbLightness(divergingColour(-t))).toBeCloseTo(srgbLightness(divergingColour(t)), -0.5);
    const [rn, , bn] = divergingColour(-1);
    const [rp, , bp] = divergingColour(1);
    expect(bn).toBeGreaterThan(rn);
    expect(rp).toBeGreaterThan(bp);
  });
});

describe('series styles', () => {
  it('use the Okabe–Ito colours (Okabe & Ito 2008; hex values from memory)', () => {
    expect(OKABE_ITO).toMatchObject({ orange: '#E69F00', skyBlue: '#56B4E9', bluishGreen: '#009E73', blue: '#0072B2', vermillion: '#D55E00', reddishPurple: '#CC79A7' });
    const palette = new Set<string>(Object.values(OKABE_ITO));
    for (const s of SERIES) expect(palette.has(s.colour)).toBe(true);
  });

  it('differ in dash pattern and marker shape as well as colour among the first six', () => {
    const six = SERIES.slice(0, 6);
    expect(new Set(six.map((s) => s.colour)).size).toBe(6);
    expect(new Set(six.map((s) => JSON.stringify(s.dash))).size).toBe(6);
    expect(new Set(six.map((s) => s.marker)).size).toBe(6);
  });
});

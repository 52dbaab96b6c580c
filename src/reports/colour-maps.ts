/**
 * Colour maps for heat maps, computed here rather than copied from a table.
 *
 * Both maps are paths through CIELAB (CIE 15:2004) converted to sRGB (IEC 61966-2-1,
 * D65 white). The sequential map raises lightness L* linearly from dark blue-violet to
 * light yellow, in the spirit of viridis: monotone lightness means it prints as a clean
 * grey ramp and stays readable for red–green colour-blind readers. The diverging map runs
 * blue → near-white → orange-red with lightness symmetric about the centre, so a signed
 * difference reads by sign (hue) and magnitude (lightness).
 */

export type Rgb = [number, number, number];

const WHITE_D65 = [0.95047, 1.0, 1.08883] as const;

function labToXyz(L: number, a: number, b: number): [number, number, number] {
  const fy = (L + 16) / 116;
  const fx = fy + a / 500;
  const fz = fy - b / 200;
  const eps = 216 / 24389;
  const kappa = 24389 / 27;
  const inv = (t: number): number => (t ** 3 > eps ? t ** 3 : (116 * t - 16) / kappa);
  const yr = L > kappa * eps ? fy ** 3 : L / kappa;
  return [inv(fx) * WHITE_D65[0], yr * WHITE_D65[1], inv(fz) * WHITE_D65[2]];
}

function linearToSrgb(c: number): number {
  return c <= 0.0031308 ? 12.92 * c : 1.055 * c ** (1 / 2.4) - 0.055;
}

/** Linear sRGB components (may fall outside [0, 1] for colours outside the gamut). */
function labToLinearRgb(L: number, a: number, b: number): [number, number, number] {
  const [X, Y, Z] = labToXyz(L, a, b);
  return [3.2404542 * X - 1.5371385 * Y - 0.4985314 * Z, -0.969266 * X + 1.8760108 * Y + 0.041556 * Z, 0.0556434 * X - 0.2040259 * Y + 1.0572252 * Z];
}

const inGamut = (rgb: number[]): boolean => rgb.every((c) => c >= -1e-9 && c <= 1 + 1e-9);

/** CIELAB → 8-bit sRGB; out-of-gamut values are clipped. */
export function labToSrgb(L: number, a: number, b: number): Rgb {
  return labToLinearRgb(L, a, b).map((c) => Math.round(255 * Math.min(1, Math.max(0, linearToSrgb(c))))) as Rgb;
}

/** Largest chroma ≤ wanted at (L, hue) that stays inside the sRGB gamut (bisection). */
function gamutChroma(L: number, hueDeg: number, wanted: number): number {
  const h = (hueDeg * Math.PI) / 180;
  const ok = (c: number): boolean => inGamut(labToLinearRgb(L, c * Math.cos(h), c * Math.sin(h)));
  if (ok(wanted)) return wanted;
  let lo = 0;
  let hi = wanted;
  for (let i = 0; i < 30; i++) {
    const mid = (lo + hi) / 2;
    if (ok(mid)) lo = mid;
    else hi = mid;
  }
  return lo;
}

function lch(L: number, chroma: number, hueDeg: number): Rgb {
  const c = gamutChroma(L, hueDeg, chroma);
  const h = (hueDeg * Math.PI) / 180;
  return labToSrgb(L, c * Math.cos(h), c * Math.sin(h));
}

/** The lightness path of the sequential map, exported for tests. */
export function sequentialLightness(t: number): number {
  return 18 + 74 * t;
}

function buildSequential(n: number): Rgb[] {
  const out: Rgb[] = [];
  for (let i = 0; i < n; i++) {
    const t = i / (n - 1);
    // Hue turns from violet-blue (~290°) through teal and green to yellow (~95°);
    // chroma swells in the middle, where the gamut allows it.
    const hue = 290 - 195 * t;
    const chroma = 38 + 40 * t * t;
    out.push(lch(sequentialLightness(t), chroma, hue));
  }
  return out;
}

function buildDiverging(n: number): Rgb[] {
  const out: Rgb[] = [];
  for (let i = 0; i < n; i++) {
    const t = (2 * i) / (n - 1) - 1; // −1 … 1
    const m = Math.abs(t);
    const L = 97 - 57 * m;
    const chroma = 60 * m;
    out.push(lch(L, chroma, t < 0 ? 255 : 40));
  }
  return out;
}

const SEQUENTIAL = buildSequential(256);
const DIVERGING = buildDiverging(257);

/** Colour of t ∈ [0, 1] (clamped) on the sequential map. */
export function sequentialColour(t: number): Rgb {
  const i = Math.round(Math.min(1, Math.max(0, Number.isFinite(t) ? t : 0)) * (SEQUENTIAL.length - 1));
  return SEQUENTIAL[i];
}

/** Colour of t ∈ [−1, 1] (clamped) on the diverging map; 0 is near-white. */
export function divergingColour(t: number): Rgb {
  const u = (Math.min(1, Math.max(-1, Number.isFinite(t) ? t : 0)) + 1) / 2;
  return DIVERGING[Math.round(u * (DIVERGING.length - 1))];
}

/** CIELAB L* of an 8-bit sRGB colour (for tests of the maps' lightness). */
export function srgbLightness(rgb: Rgb): number {
  const lin = rgb.map((v) => {
    const c = v / 255;
    return c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
  });
  const Y = 0.2126729 * lin[0] + 0.7151522 * lin[1] + 0.072175 * lin[2];
  return Y > 216 / 24389 ? 116 * Math.cbrt(Y) - 16 : (24389 / 27) * Y;
}

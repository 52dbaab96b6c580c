/**
 * The scattering-length-density (SLD) profile of a film on a substrate, from its composition.
 *
 * Units: depth z in nm, measured up from the substrate surface (the film's bottom wall) at
 * z = 0 to the film's top at z = H; SLD in Å⁻².
 * Assumption (common practice, no source): SLDs add by volume fraction, so inside the film
 * ρ(z) = φ_A(z) ρ_A + (1 − φ_A(z)) ρ_B (equal segment volumes, no voids, the melt
 * incompressible up to the walls as in the film model); below z = 0 the substrate, above
 * z = H the medium (air, or a solvent).
 * Interfaces: the whole stack is convolved with a normalised Gaussian of standard deviation s
 * (an interface width: roughness and depth resolution together). For a piecewise-constant
 * profile that convolution is exact in closed form, ρ_s(z) = ρ_sub + Σ_k Δρ_k Φ((z − e_k)/s)
 * over the steps Δρ_k at the edges e_k; Parratt's recursion then sees it finely sliced.
 */
import { normalCdf } from '../numerics/normal-cdf.js';
import type { LayerStack } from './parratt.js';

export interface StackSlds {
  /** SLD of pure A, pure B, the substrate and the medium above the film, Å⁻². */
  A: number;
  B: number;
  substrate: number;
  medium: number;
}

/** A piecewise-constant SLD between the substrate and the medium: values[k] on [edges[k], edges[k+1]]. */
export interface SldSteps {
  edges: Float64Array;
  values: Float64Array;
  substrate: number;
  medium: number;
}

/** The film's SLD steps from φ_A at equal cells over [0, H] (their centres). */
export function filmSldSteps(phiA: ArrayLike<number>, thicknessNm: number, slds: StackSlds): SldSteps {
  const m = phiA.length;
  const edges = Float64Array.from({ length: m + 1 }, (_, k) => (k * thicknessNm) / m);
  const values = Float64Array.from({ length: m }, (_, k) => phiA[k] * slds.A + (1 - phiA[k]) * slds.B);
  return { edges, values, substrate: slds.substrate, medium: slds.medium };
}

/** The SLD at depths z (nm) after convolution with a Gaussian of standard deviation s (nm); s = 0: the steps. */
export function smoothedSld(steps: SldSteps, s: number, z: ArrayLike<number>): Float64Array {
  const levels = [steps.substrate, ...steps.values, steps.medium];
  const out = new Float64Array(z.length);
  for (let i = 0; i < z.length; i++) {
    let v = steps.substrate;
    for (let k = 0; k < steps.edges.length; k++) {
      const jump = levels[k + 1] - levels[k];
      if (jump === 0) continue;
      const u = z[i] - steps.edges[k];
      v += jump * (s > 0 ? normalCdf(u / s) : u >= 0 ? 1 : 0);
    }
    out[i] = v;
  }
  return out;
}

/** Gaussian tails beyond this many widths are cut when slicing (their weight is below 3e-5). */
const TAIL_WIDTHS = 4;

/**
 * The stack as Parratt layers: the smoothed profile from z = −4s to H + 4s in slices no
 * thicker than `maxSliceNm`, each at its midpoint SLD, with sharp slice boundaries; the
 * substrate and medium beyond. With s = 0 the slices are the steps themselves.
 */
export function slicedStack(steps: SldSteps, s: number, maxSliceNm: number): LayerStack {
  const H = steps.edges[steps.edges.length - 1];
  if (!(s > 0)) {
    const layers = [];
    for (let k = steps.values.length - 1; k >= 0; k--) layers.push({ thickness: steps.edges[k + 1] - steps.edges[k], sld: steps.values[k], roughness: 0 });
    return { ambient: steps.medium, layers, substrate: { sld: steps.substrate, roughness: 0 } };
  }
  const lo = -TAIL_WIDTHS * s;
  const hi = H + TAIL_WIDTHS * s;
  const count = Math.max(1, Math.ceil((hi - lo) / maxSliceNm));
  const dz = (hi - lo) / count;
  const mids = Float64Array.from({ length: count }, (_, k) => hi - (k + 0.5) * dz);
  const rho = smoothedSld(steps, s, mids);
  return { ambient: steps.medium, layers: Array.from(rho, (v) => ({ thickness: dz, sld: v, roughness: 0 })), substrate: { sld: steps.substrate, roughness: 0 } };
}

/**
 * Specular reflectivity of a stack of flat layers by Parratt's recursion (Parratt, Phys. Rev.
 * 95, 359 (1954)), with the Névot–Croce roughness factor at each interface (Névot & Croce,
 * Rev. Phys. Appl. 15, 761 (1980)).
 *
 * Units: Q (momentum transfer, 4π sinθ/λ) in Å⁻¹; scattering-length densities (SLD) in Å⁻²;
 * layer thicknesses and roughnesses in nm (converted to Å here). The beam enters from the
 * ambient medium (layer 0, on top) and the substrate is semi-infinite at the bottom.
 * Absorption is neglected (real SLDs): for neutrons on polymer films it is small (common
 * practice, no source); an SLD below the ambient's gives total reflection below its edge.
 *
 * In layer j the normal wave number is k_j = sqrt((Q/2)² − 4π(ρ_j − ρ_0)) (complex below the
 * critical edge, taken with Im k ≥ 0 so the wave decays downward). The Fresnel coefficient of
 * the interface between j and j+1 is r = (k_j − k_{j+1})/(k_j + k_{j+1}), multiplied by
 * exp(−2 k_j k_{j+1} σ²) for a Gaussian roughness σ (Névot–Croce). From the substrate up,
 * X_j = (r_j + X_{j+1} e^{2i k_{j+1} d_{j+1}}) / (1 + r_j X_{j+1} e^{2i k_{j+1} d_{j+1}}), X_last = 0,
 * and R = |X_0|².
 */

export interface Layer {
  /** Thickness, nm. */
  thickness: number;
  /** SLD, Å⁻². */
  sld: number;
  /** Gaussian roughness of the interface on top of this layer, nm. */
  roughness: number;
}

export interface LayerStack {
  /** SLD of the medium the beam comes from (on top), Å⁻². */
  ambient: number;
  /** Layers from the top down. */
  layers: Layer[];
  /** The semi-infinite substrate at the bottom. */
  substrate: { sld: number; roughness: number };
}

const NM = 10; // Å per nm

/** R(Q) of the stack at each Q (Å⁻¹). */
export function parrattReflectivity(stack: LayerStack, q: ArrayLike<number>): Float64Array {
  const sld = [stack.ambient, ...stack.layers.map((l) => l.sld), stack.substrate.sld];
  const d = [0, ...stack.layers.map((l) => l.thickness * NM), 0];
  // sigma[j]: roughness of the interface between j and j+1.
  const sigma = [...stack.layers.map((l) => l.roughness * NM), stack.substrate.roughness * NM];
  const n = sld.length;
  const out = new Float64Array(q.length);
  const kr = new Float64Array(n);
  const ki = new Float64Array(n);
  const edge = Float64Array.from(sld, (v) => 4 * Math.PI * (v - sld[0]));
  for (let iq = 0; iq < q.length; iq++) {
    const half = Math.abs(q[iq]) / 2;
    for (let j = 0; j < n; j++) {
      // k_j² is real (no absorption): k_j is real above layer j's edge, imaginary below it.
      const k2 = half * half - edge[j];
      kr[j] = k2 >= 0 ? Math.sqrt(k2) : 0;
      ki[j] = k2 >= 0 ? 0 : Math.sqrt(-k2);
    }
    // X of the substrate is 0; climb to the top.
    let xr = 0;
    let xi = 0;
    for (let j = n - 2; j >= 0; j--) {
      // r = (k_j − k_{j+1}) / (k_j + k_{j+1})
      const nr = kr[j] - kr[j + 1];
      const ni = ki[j] - ki[j + 1];
      const dr = kr[j] + kr[j + 1];
      const di = ki[j] + ki[j + 1];
      const dd = dr * dr + di * di;
      let rr = dd > 0 ? (nr * dr + ni * di) / dd : 0;
      let ri = dd > 0 ? (ni * dr - nr * di) / dd : 0;
      const s = sigma[j];
      if (s > 0) {
        // × exp(−2 k_j k_{j+1} σ²)
        const pr = kr[j] * kr[j + 1] - ki[j] * ki[j + 1];
        const pi = kr[j] * ki[j + 1] + ki[j] * kr[j + 1];
        const er = Math.exp(-2 * pr * s * s);
        const ang = -2 * pi * s * s;
        const fr = er * Math.cos(ang);
        const fi = er * Math.sin(ang);
        [rr, ri] = [rr * fr - ri * fi, rr * fi + ri * fr];
      }
      // phase e^{2i k_{j+1} d_{j+1}} (1 for the substrate, whose X is 0 anyway)
      const dj = d[j + 1];
      const amp = Math.exp(-2 * ki[j + 1] * dj);
      const ph = 2 * kr[j + 1] * dj;
      const er = amp * Math.cos(ph);
      const ei = amp * Math.sin(ph);
      const yr = xr * er - xi * ei;
      const yi = xr * ei + xi * er;
      // X = (r + y) / (1 + r·y)
      const topR = rr + yr;
      const topI = ri + yi;
      const botR = 1 + rr * yr - ri * yi;
      const botI = rr * yi + ri * yr;
      const bb = botR * botR + botI * botI;
      xr = (topR * botR + topI * botI) / bb;
      xi = (topI * botR - topR * botI) / bb;
    }
    out[iq] = xr * xr + xi * xi;
  }
  return out;
}

/** The critical edge of a substrate below an ambient: Q_c = 4·sqrt(π Δρ), Å⁻¹ (0 when Δρ ≤ 0). */
export function criticalEdge(substrateSld: number, ambientSld: number): number {
  const dr = substrateSld - ambientSld;
  return dr > 0 ? 4 * Math.sqrt(Math.PI * dr) : 0;
}

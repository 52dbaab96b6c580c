/**
 * Parratt's recursion against analytic results for simple stacks. Units: Q in Å⁻¹, SLD in Å⁻²,
 * lengths in nm (src/reflectivity/parratt.ts).
 */
import { describe, expect, it } from 'vitest';
import { criticalEdge, parrattReflectivity } from '../../src/reflectivity/parratt.js';
import { smearedReflectivity } from '../../src/reflectivity/q-resolution.js';
import { filmSldSteps, slicedStack, smoothedSld } from '../../src/reflectivity/sld-profile.js';

// Silicon's neutron SLD, 2.07e-6 Å⁻² (from memory); a deuterated-polymer-like 6.0e-6 and a
// protonated-polymer-like 1.0e-6 Å⁻² (from memory, round values).
const SI = 2.07e-6;
const D = 6.0e-6;
const H = 1.0e-6;

const qs = (lo: number, hi: number, n: number) => Float64Array.from({ length: n }, (_, i) => lo + ((hi - lo) * i) / (n - 1));

describe('Parratt reflectivity', () => {
  it('a bare substrate gives the Fresnel reflectivity', () => {
    // Fresnel reflectivity in Q: R = |(Q − sqrt(Q² − Q_c²)) / (Q + sqrt(Q² − Q_c²))|², 1 below Q_c
    // (Als-Nielsen & McMorrow, Elements of Modern X-ray Physics (2011), ch. 3).
    const qc = 4 * Math.sqrt(Math.PI * SI);
    const q = qs(0.002, 0.2, 200);
    const r = parrattReflectivity({ ambient: 0, layers: [], substrate: { sld: SI, roughness: 0 } }, q);
    q.forEach((v, i) => {
      const want = v <= qc ? 1 : ((v - Math.sqrt(v * v - qc * qc)) / (v + Math.sqrt(v * v - qc * qc))) ** 2;
      expect(Math.abs(r[i] - want)).toBeLessThan(1e-12 + 1e-10 * want);
    });
  });

  it('total reflection ends at the critical edge Q_c = 4·sqrt(π Δρ)', () => {
    // Q_c = 4 sqrt(π Δρ) (Als-Nielsen & McMorrow, ch. 3); for silicon about 0.0102 Å⁻¹ (from memory).
    const qc = criticalEdge(SI, 0);
    expect(qc).toBeCloseTo(0.0102, 4);
    const r = parrattReflectivity({ ambient: 0, layers: [], substrate: { sld: SI, roughness: 0 } }, [0.98 * qc, 0.999 * qc, 1.001 * qc, 1.02 * qc]);
    expect(r[0]).toBeCloseTo(1, 12);
    expect(r[1]).toBeCloseTo(1, 12);
    expect(r[2]).toBeLessThan(0.95);
    expect(r[3]).toBeLessThan(0.6);
    // A film on top does not move the substrate's edge when the film's SLD is lower.
    const rf = parrattReflectivity({ ambient: 0, layers: [{ thickness: 30, sld: H, roughness: 0 }], substrate: { sld: SI, roughness: 0 } }, [0.99 * qc, 1.05 * qc]);
    expect(rf[0]).toBeCloseTo(1, 10);
    expect(rf[1]).toBeLessThan(0.9);
  });

  it('one uniform slab on a substrate matches the closed-form (Airy) reflectivity', () => {
    // Above both critical edges the Fresnel coefficients are real and
    // R = (r01² + r12² + 2 r01 r12 cos 2k1d) / (1 + r01² r12² + 2 r01 r12 cos 2k1d)
    // (Born & Wolf, Principles of Optics, §1.6, thin film; written here in real arithmetic).
    const d = 40; // nm
    const q = qs(0.02, 0.25, 300);
    const r = parrattReflectivity({ ambient: 0, layers: [{ thickness: d, sld: D, roughness: 0 }], substrate: { sld: SI, roughness: 0 } }, q);
    q.forEach((v, i) => {
      const k0 = v / 2;
      const k1 = Math.sqrt(k0 * k0 - 4 * Math.PI * D);
      const k2 = Math.sqrt(k0 * k0 - 4 * Math.PI * SI);
      const r01 = (k0 - k1) / (k0 + k1);
      const r12 = (k1 - k2) / (k1 + k2);
      const c = Math.cos(2 * k1 * d * 10);
      const want = (r01 * r01 + r12 * r12 + 2 * r01 * r12 * c) / (1 + r01 * r01 * r12 * r12 + 2 * r01 * r12 * c);
      expect(Math.abs(r[i] - want) / want).toBeLessThan(1e-9);
    });
  });

  it('Kiessig fringes are spaced by ΔQ ≈ 2π/thickness', () => {
    // Far above the edge the fringe period in Q is 2π/d (Kiessig, Ann. Phys. 402, 769 (1931)).
    const d = 50; // nm = 500 Å
    const q = qs(0.05, 0.2, 6000);
    const r = parrattReflectivity({ ambient: 0, layers: [{ thickness: d, sld: H, roughness: 0 }], substrate: { sld: SI, roughness: 0 } }, q);
    const minima: number[] = [];
    for (let i = 1; i + 1 < q.length; i++) if (r[i] < r[i - 1] && r[i] < r[i + 1]) minima.push(q[i]);
    expect(minima.length).toBeGreaterThan(8);
    const spacing = (minima[minima.length - 1] - minima[0]) / (minima.length - 1);
    expect(Math.abs(spacing - (2 * Math.PI) / (d * 10)) / ((2 * Math.PI) / (d * 10))).toBeLessThan(0.01);
  });

  it('approaches the Born approximation at large Q', () => {
    // Kinematic (Born) limit: R(Q) ≈ (16π²/Q⁴) |Σ_k Δρ_k e^{iQ z_k}|² over the SLD steps Δρ_k at
    // depths z_k (Als-Nielsen & McMorrow, ch. 3, the "master formula"). Born ignores refraction,
    // which shifts the fringes slightly (k1 ≠ Q/2 in the film), so R is compared fringe-averaged:
    // over one fringe period 2π/d; the difference falls as Q grows (measured 1.4 %, 0.3 %, 4e-5 at
    // Q = 0.2, 0.3, 0.6 Å⁻¹).
    const d = 40;
    const period = (2 * Math.PI) / (d * 10);
    for (const [q0, tol] of [[0.2, 0.02], [0.3, 0.01], [0.6, 0.001]]) {
      const q = qs(q0, q0 + period, 400);
      const r = parrattReflectivity({ ambient: 0, layers: [{ thickness: d, sld: D, roughness: 0 }], substrate: { sld: SI, roughness: 0 } }, q);
      let sumR = 0;
      let sumBorn = 0;
      q.forEach((v, i) => {
        const a = D - 0;
        const b = SI - D;
        const ph = v * d * 10;
        sumBorn += ((16 * Math.PI * Math.PI) / v ** 4) * ((a + b * Math.cos(ph)) ** 2 + (b * Math.sin(ph)) ** 2);
        sumR += r[i];
      });
      expect(Math.abs(sumR / sumBorn - 1)).toBeLessThan(tol);
    }
  });

  it('Névot–Croce roughness damps a substrate by exp(−Q²σ²) at large Q, as a finely sliced error-function profile does', () => {
    // For Q ≫ Q_c, k0 ≈ k1 ≈ Q/2 and the Névot–Croce factor exp(−2k0k1σ²) on r gives
    // R ≈ R_F exp(−Q²σ²), the Born result for a Gaussian-graded step (Als-Nielsen & McMorrow, ch. 3).
    const sigma = 0.8; // nm
    const q = qs(0.05, 0.2, 30);
    const flat = parrattReflectivity({ ambient: 0, layers: [], substrate: { sld: SI, roughness: 0 } }, q);
    const rough = parrattReflectivity({ ambient: 0, layers: [], substrate: { sld: SI, roughness: sigma } }, q);
    // Independent: the same interface as an error-function profile, sliced at 0.05 nm.
    const steps = filmSldSteps([0], 0, { A: 0, B: 0, substrate: SI, medium: 0 });
    const sliced = parrattReflectivity(slicedStack(steps, sigma, 0.05), q);
    q.forEach((v, i) => {
      const s = sigma * 10;
      expect(Math.abs(rough[i] / flat[i] / Math.exp(-v * v * s * s) - 1)).toBeLessThan(0.02);
      expect(Math.abs(sliced[i] / rough[i] - 1)).toBeLessThan(0.05);
    });
  });

  it('the Gaussian resolution average reproduces the moments of a Gaussian', () => {
    // ⟨Q'²⟩ over a Gaussian of standard deviation σ_Q is Q² + σ_Q², with σ_Q = FWHM/(2 sqrt(2 ln 2))
    // (definition of the FWHM of a Gaussian; common practice, no source).
    const q = [0.02, 0.05, 0.1];
    const out = smearedReflectivity((x) => x.map((v) => v * v), q, 0.1);
    q.forEach((v, i) => {
      const s = (0.1 * v) / (2 * Math.sqrt(2 * Math.LN2));
      expect(Math.abs(out[i] - (v * v + s * s)) / (s * s)).toBeLessThan(0.01);
    });
    // A constant stays constant; no smearing leaves R untouched.
    expect(smearedReflectivity((x) => x.map(() => 3), q, 0.05).every((v) => Math.abs(v - 3) < 1e-14)).toBe(true);
  });

  it('the smoothed SLD profile is the exact Gaussian convolution of its steps', () => {
    // Independent: numerical convolution of the step profile with a Gaussian by the midpoint rule.
    const steps = filmSldSteps([0.2, 0.9, 0.4], 30, { A: D, B: H, substrate: SI, medium: 0 });
    const s = 2;
    const z = [-3, 0, 5, 10, 17, 29, 33];
    const got = smoothedSld(steps, s, z);
    const raw = (x: number) => (x < 0 ? SI : x >= 30 ? 0 : steps.values[Math.min(2, Math.floor(x / 10))]);
    z.forEach((zi, i) => {
      let acc = 0;
      let wsum = 0;
      for (let k = -4000; k <= 4000; k++) {
        const u = (k / 4000) * 8 * s;
        const w = Math.exp(-0.5 * (u / s) ** 2);
        acc += w * raw(zi - u);
        wsum += w;
      }
      expect(Math.abs(got[i] - acc / wsum)).toBeLessThan(2e-3 * D);
    });
  });
});

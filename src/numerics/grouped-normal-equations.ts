/**
 * Gauss–Newton normal equations A = JᵀJ, g = Jᵀr from a Jacobian given in groups of rows,
 * each group touching only its own columns (a block-sparse J: the residuals of one
 * propagator network do not depend on another's parameters). Each group's product is
 * formed on its own compact columns and added into A, so a group of k columns costs
 * rows·k²/2 multiply-adds instead of rows·n²/2 (common practice, no source). A group may
 * carry more columns as a product C·E through a few intermediates (FactoredColumns below),
 * whose blocks then cost about t·k'·(k + k') instead of rows·k'·(k + k'/2).
 * A is row-major n·n with only the lower triangle filled (what numerics/cholesky.ts reads).
 */
import { float64Kernels } from './float64-kernels.js';
import type { Float64Kernels } from './float64-kernels.js';

/**
 * Columns of a group whose Jacobian block is a product C·E of a (mostly zero) m × t matrix C
 * and a t × k' matrix E with t small: rows that depend on these parameters only through t
 * intermediate quantities (in the residual system: a propagator's junction values at the
 * grid points, which every later block's rows share). Its normal-matrix blocks are formed
 * through the t intermediates, Eᵀ(CᵀC)E and Eᵀ(CᵀJ), instead of row by row.
 */
export interface FactoredColumns {
  /** Global columns, strictly ascending, none among the group's own columns. */
  columns: Int32Array;
  /** Intermediates. */
  t: number;
  /** Row-major m × t; zero entries are skipped. */
  C: Float64Array;
  /** Row-major t × columns.length. */
  E: Float64Array;
}

export interface ResidualGroup {
  /** Global column (parameter) indices of the group, strictly ascending. */
  columns: Int32Array;
  /** Row-major rows × columns.length. */
  J: Float64Array;
  /** The group's residuals, one per row. */
  r: Float64Array;
  /** More columns of the same rows, as a product (their Jacobian is C·E). */
  factored?: FactoredColumns;
}

/** ∂r_row/∂θ_column of a group (0 for a column it does not touch): its J or its C·E. */
export function groupJacobianEntry(grp: ResidualGroup, row: number, column: number): number {
  const k = grp.columns.indexOf(column);
  if (k >= 0) return grp.J[row * grp.columns.length + k];
  const f = grp.factored;
  const c = f ? f.columns.indexOf(column) : -1;
  if (!f || c < 0) return 0;
  let s = 0;
  for (let t = 0; t < f.t; t++) s += f.C[row * f.t + t] * f.E[t * f.columns.length + c];
  return s;
}

/** Rows of J taken at a time: the transposed chunk (k × CHUNK) stays in cache while G is updated. */
const CHUNK = 64;

/**
 * G += Jcᵀ Jc (lower triangle, k × k) for the rows [i0, i0 + rows) of J (row-major m × k), and
 * gl += Jcᵀ r. The chunk is transposed into T (k × rows) so each product is a dot product
 * over contiguous memory, and the products are formed two columns a × four columns b at a
 * time by addRowProducts (eight sums in registers, each value read once per block): about twice the rate of
 * one whole-height dot product at a time at k ≈ 800, m ≈ 1000 (measured), where the
 * transposed J no longer fits in cache (common practice, no source).
 */
function addChunk(J: Float64Array, r: Float64Array, k: number, i0: number, rows: number, T: Float64Array, G: Float64Array, gl: Float64Array): void {
  const R = rows;
  for (let i = 0; i < R; i++) {
    const o = (i0 + i) * k;
    for (let a = 0; a < k; a++) T[a * R + i] = J[o + a];
  }
  addChunkGradient(J, r, k, i0, R, gl);
  // Gᵢⱼ += Σ_rows T[i]·T[j], the lower triangle.
  addRowProducts(T, k, T, k, R, true, G, k);
}

/** gl += Jcᵀ r over the rows [i0, i0 + rows): each entry summed over the chunk's rows in order, then added (both forms of the normal matrix). */
function addChunkGradient(J: Float64Array, r: Float64Array, k: number, i0: number, rows: number, gl: Float64Array): void {
  const s = new Float64Array(k);
  for (let i = i0; i < i0 + rows; i++) {
    const ri = r[i];
    const o = i * k;
    for (let a = 0; a < k; a++) s[a] += J[o + a] * ri;
  }
  for (let a = 0; a < k; a++) gl[a] += s[a];
}

/** A group's JᵀJ (lower triangle, row stride k) and Jᵀr (into gl) by the JS chunks. */
function groupProductJs(J: Float64Array, r: Float64Array, k: number, m: number, gl: Float64Array): { G: Float64Array; ld: number } {
  const G = new Float64Array(k * k);
  const T = new Float64Array(k * Math.min(CHUNK, m));
  for (let i0 = 0; i0 < m; i0 += CHUNK) addChunk(J, r, k, i0, Math.min(CHUNK, m - i0), T, G, gl);
  return { G, ld: k };
}

/**
 * The same by the f64x2 kernel (numerics/float64-kernels.ts): J copied into the kernels'
 * memory with its rows padded to a multiple of 8 columns (zeros), the same chunks of CHUNK
 * rows, each entry summed over a chunk in the same order as addChunk and then added to G, so
 * G is the JS form's to the last bit. G is a view of the kernels' memory, row stride kp,
 * valid until the kernels' next use; Jᵀr by addChunkGradient, as in addChunk.
 */
function groupProductWasm(kernels: Float64Kernels, J: Float64Array, r: Float64Array, k: number, m: number, gl: Float64Array): { G: Float64Array; ld: number } {
  const kp = Math.ceil(k / 8) * 8;
  kernels.reset();
  const Js = kernels.scratch(m * kp);
  const Gs = kernels.scratch(kp * kp);
  const Jv = kernels.view(Js);
  for (let i = 0; i < m; i++) Jv.set(J.subarray(i * k, (i + 1) * k), i * kp);
  for (let i0 = 0; i0 < m; i0 += CHUNK) {
    const rows = Math.min(CHUNK, m - i0);
    kernels.syrkLower(Js.offset + i0 * kp * 8, kp, rows, Gs.offset);
    addChunkGradient(J, r, k, i0, rows, gl);
  }
  return { G: kernels.view(Gs), ld: kp };
}

export function groupedNormalEquations(n: number, groups: readonly ResidualGroup[]): { A: Float64Array; g: Float64Array; cost: number } {
  const A = new Float64Array(n * n);
  const g = new Float64Array(n);
  let sumSq = 0;
  for (const grp of groups) {
    const k = grp.columns.length;
    const m = grp.r.length;
    if (grp.J.length !== m * k) throw new RangeError(`group has ${grp.J.length} Jacobian entries, expected ${m}·${k}`);
    for (let i = 0; i < m; i++) sumSq += grp.r[i] * grp.r[i];
    const gl = new Float64Array(k);
    const kernels = float64Kernels();
    const { G, ld } = kernels && k >= 8 ? groupProductWasm(kernels, grp.J, grp.r, k, m, gl) : groupProductJs(grp.J, grp.r, k, m, gl);
    const c = grp.columns;
    for (let a = 0; a < k; a++) {
      g[c[a]] += gl[a];
      const ra = c[a] * n;
      const ga = a * ld;
      for (let b = 0; b <= a; b++) A[ra + c[b]] += G[ga + b];
    }
    if (grp.factored) addFactored(n, grp, A, g);
  }
  return { A, g, cost: 0.5 * sumSq };
}

/**
 * Out[a·ldo + b] += Σ_u P[a·t + u] · Q[b·t + u] for a < rowsP and b < (lower ? a + 1 : rowsQ):
 * products of rows of two row-major matrices over their common length t, two rows of P × four
 * rows of Q at a time (eight sums in registers, contiguous reads). With
 * `lower` only b ≤ a is formed (P = Q: a lower triangle). Common practice, no source.
 */
function addRowProducts(P: Float64Array, rowsP: number, Q: Float64Array, rowsQ: number, t: number, lower: boolean, Out: Float64Array, ldo: number): void {
  let a = 0;
  for (; a + 1 < rowsP; a += 2) {
    const pa = a * t;
    const pb = pa + t;
    const oa = a * ldo;
    const ob = oa + ldo;
    const end = lower ? a + 2 : rowsQ;
    let b = 0;
    for (; b + 3 < end && (!lower || b + 3 <= a); b += 4) {
      const q0 = b * t;
      const q1 = q0 + t;
      const q2 = q1 + t;
      const q3 = q2 + t;
      let s00 = 0;
      let s01 = 0;
      let s02 = 0;
      let s03 = 0;
      let s10 = 0;
      let s11 = 0;
      let s12 = 0;
      let s13 = 0;
      for (let u = 0; u < t; u++) {
        const x = P[pa + u];
        const y = P[pb + u];
        const z0 = Q[q0 + u];
        const z1 = Q[q1 + u];
        const z2 = Q[q2 + u];
        const z3 = Q[q3 + u];
        s00 += x * z0;
        s01 += x * z1;
        s02 += x * z2;
        s03 += x * z3;
        s10 += y * z0;
        s11 += y * z1;
        s12 += y * z2;
        s13 += y * z3;
      }
      Out[oa + b] += s00;
      Out[oa + b + 1] += s01;
      Out[oa + b + 2] += s02;
      Out[oa + b + 3] += s03;
      Out[ob + b] += s10;
      Out[ob + b + 1] += s11;
      Out[ob + b + 2] += s12;
      Out[ob + b + 3] += s13;
    }
    for (; b < end; b++) {
      const qc = b * t;
      let s0 = 0;
      let s1 = 0;
      for (let u = 0; u < t; u++) {
        const z = Q[qc + u];
        s0 += P[pa + u] * z;
        s1 += P[pb + u] * z;
      }
      if (!lower || b <= a) Out[oa + b] += s0;
      Out[ob + b] += s1;
    }
  }
  for (; a < rowsP; a++) {
    const pa = a * t;
    const end = lower ? a + 1 : rowsQ;
    for (let b = 0; b < end; b++) {
      const qc = b * t;
      let s = 0;
      for (let u = 0; u < t; u++) s += P[pa + u] * Q[qc + u];
      Out[a * ldo + b] += s;
    }
  }
}

/**
 * The normal-matrix blocks of a group's factored columns F (Jacobian C·E) into A and g:
 *   g_F += Eᵀ(Cᵀr),  A_FF += Eᵀ(CᵀC)E,  A_FJ += Eᵀ(CᵀJ),
 * each cross entry stored in the lower triangle (row the larger global column). The two
 * products over the t intermediates are formed from transposed copies (Eᵀ, (SE)ᵀ, (CᵀJ)ᵀ,
 * rows of length t) by addRowProducts: dot products over contiguous memory instead of
 * one axpy over a whole row of the result per intermediate, which streamed the k'·(k + k')
 * result t times through memory (0.20 s against 0.03 s of CPU per call at k = k' = 417,
 * t = 128, measured).
 */
function addFactored(n: number, grp: ResidualGroup, A: Float64Array, g: Float64Array): void {
  const f = grp.factored!;
  const m = grp.r.length;
  const k = grp.columns.length;
  const kf = f.columns.length;
  const t = f.t;
  if (f.C.length !== m * t || f.E.length !== t * kf) throw new RangeError(`factored columns: C has ${f.C.length} entries and E ${f.E.length}, expected ${m}·${t} and ${t}·${kf}`);
  const kernels = float64Kernels();
  if (kernels && k >= 8 && kf >= 8) {
    addFactoredWasm(kernels, n, grp, A, g);
    return;
  }
  // HT = (CᵀJ)ᵀ (k × t), S = CᵀC (t × t), Cr = Cᵀr.
  const HT = new Float64Array(k * t);
  const { S, Cr } = intermediateProducts(grp, HT, t, 1);
  // ET = Eᵀ (kf × t); SET = (S·E)ᵀ (kf × t).
  const ET = new Float64Array(kf * t);
  for (let u = 0; u < t; u++) {
    const eu = u * kf;
    for (let a = 0; a < kf; a++) ET[a * t + u] = f.E[eu + a];
  }
  const SET = new Float64Array(kf * t);
  addSE(f, S, SET, t, 1);
  addECr(f, Cr, g);
  const F = new Float64Array(kf * kf);
  const X = new Float64Array(kf * k);
  addRowProducts(ET, kf, SET, kf, t, true, F, kf);
  addRowProducts(ET, kf, HT, k, t, false, X, k);
  scatterFactored(n, grp, F, kf, X, k, A);
}

/**
 * One pass over a group's rows, zeros of C skipped: S = CᵀC (t × t), Cr = Cᵀr, and H += CᵀJ
 * with entry (u, b) at H[b·hb + u·hu] (the JS form keeps it transposed, the kernel not). Each
 * entry is summed over the rows in order, so both layouts hold the same numbers to the bit.
 */
function intermediateProducts(grp: ResidualGroup, H: Float64Array, hb: number, hu: number): { S: Float64Array; Cr: Float64Array } {
  const f = grp.factored!;
  const m = grp.r.length;
  const k = grp.columns.length;
  const t = f.t;
  const S = new Float64Array(t * t);
  const Cr = new Float64Array(t);
  for (let i = 0; i < m; i++) {
    const ci = i * t;
    const ji = i * k;
    for (let u = 0; u < t; u++) {
      const cu = f.C[ci + u];
      if (cu === 0) continue;
      Cr[u] += cu * grp.r[i];
      const hoff = u * hu;
      for (let b = 0; b < k; b++) H[b * hb + hoff] += cu * grp.J[ji + b];
      for (let v = 0; v < t; v++) S[u * t + v] += cu * f.C[ci + v];
    }
  }
  return { S, Cr };
}

/** SE += S·E (t × kf) with entry (u, a) at SE[a·sa + u·su], zeros of S skipped (S = CᵀC is sparse). */
function addSE(f: FactoredColumns, S: Float64Array, SE: Float64Array, sa: number, su: number): void {
  const t = f.t;
  const kf = f.columns.length;
  for (let u = 0; u < t; u++) {
    const uoff = u * su;
    for (let v = 0; v < t; v++) {
      const s = S[u * t + v];
      if (s === 0) continue;
      const ev = v * kf;
      for (let a = 0; a < kf; a++) SE[a * sa + uoff] += s * f.E[ev + a];
    }
  }
}

/** g_F += Eᵀ(Cᵀr), each entry summed over the intermediates in order. */
function addECr(f: FactoredColumns, Cr: Float64Array, g: Float64Array): void {
  const kf = f.columns.length;
  for (let a = 0; a < kf; a++) {
    let s = 0;
    for (let u = 0; u < f.t; u++) s += f.E[u * kf + a] * Cr[u];
    g[f.columns[a]] += s;
  }
}

/** A_FF += F (kf × kf, leading dimension ldf) and A_FJ += X (kf × k, ldx), each cross entry in the lower triangle. */
function scatterFactored(n: number, grp: ResidualGroup, F: Float64Array, ldf: number, X: Float64Array, ldx: number, A: Float64Array): void {
  const f = grp.factored!;
  const k = grp.columns.length;
  for (let a = 0; a < f.columns.length; a++) {
    const ca = f.columns[a];
    for (let b = 0; b <= a; b++) A[ca * n + f.columns[b]] += F[a * ldf + b];
    for (let b = 0; b < k; b++) {
      const cb = grp.columns[b];
      if (ca > cb) A[ca * n + cb] += X[a * ldx + b];
      else A[cb * n + ca] += X[a * ldx + b];
    }
  }
}

/**
 * addFactored with its two products over the intermediates in the f64x2 kernel
 * (numerics/float64-kernels.ts), on the untransposed E, S·E and CᵀJ (t rows each, columns
 * padded to 8): each entry summed over u in the order addRowProducts sums it, and S·E and CᵀJ
 * accumulated in addFactored's order, so the blocks are the JS form's to the last bit.
 */
function addFactoredWasm(kernels: Float64Kernels, n: number, grp: ResidualGroup, A: Float64Array, g: Float64Array): void {
  const f = grp.factored!;
  const k = grp.columns.length;
  const kf = f.columns.length;
  const t = f.t;
  const kp = Math.ceil(k / 8) * 8;
  const kfp = Math.ceil(kf / 8) * 8;
  kernels.reset();
  const Es = kernels.scratch(t * kfp);
  const SEs = kernels.scratch(t * kfp);
  const Hs = kernels.scratch(t * kp);
  const Fs = kernels.scratch(kfp * kfp);
  const Xs = kernels.scratch(kfp * kp);
  const E = kernels.view(Es);
  const SE = kernels.view(SEs);
  const H = kernels.view(Hs);
  // H = CᵀJ (t × k), S = CᵀC, Cr = Cᵀr; E copied in; SE = S·E (t × kf).
  const { S, Cr } = intermediateProducts(grp, H, 1, kp);
  for (let u = 0; u < t; u++) E.set(f.E.subarray(u * kf, (u + 1) * kf), u * kfp);
  addSE(f, S, SE, 1, kfp);
  addECr(f, Cr, g);
  kernels.productTn(Es.offset, kfp, SEs.offset, kfp, t, Fs.offset, kfp, kf, kf, true);
  kernels.productTn(Es.offset, kfp, Hs.offset, kp, t, Xs.offset, kp, kf, k, false);
  scatterFactored(n, grp, kernels.view(Fs), kfp, kernels.view(Xs), kp, A);
}

/** The groups with every column index (own and factored) lowered by `first`: a part's columns counted from 0. */
export function shiftedGroups(groups: readonly ResidualGroup[], first: number): ResidualGroup[] {
  if (first === 0) return [...groups];
  const shift = (c: Int32Array) => c.map((v) => v - first);
  return groups.map((g) => ({ ...g, columns: shift(g.columns), ...(g.factored ? { factored: { ...g.factored, columns: shift(g.factored.columns) } } : {}) }));
}

/**
 * g = Jᵀr for the groups' Jacobian and other residuals r (rs[i]: one array per group, the
 * group's rows in order): the gradient of ½‖r‖² through a Jacobian taken elsewhere. Costs
 * rows·columns per group, no normal matrix.
 */
export function groupedGradient(n: number, groups: readonly ResidualGroup[], rs: readonly Float64Array[]): Float64Array {
  const g = new Float64Array(n);
  groups.forEach((grp, gi) => {
    const r = rs[gi];
    const k = grp.columns.length;
    const m = grp.r.length;
    if (r.length !== m) throw new RangeError(`groupedGradient: group ${gi} has ${m} rows, its residuals ${r.length}`);
    const gl = new Float64Array(k);
    for (let i = 0; i < m; i++) {
      const ri = r[i];
      if (ri === 0) continue;
      const o = i * k;
      for (let a = 0; a < k; a++) gl[a] += grp.J[o + a] * ri;
    }
    for (let a = 0; a < k; a++) g[grp.columns[a]] += gl[a];
    const f = grp.factored;
    if (!f) return;
    const t = f.t;
    const kf = f.columns.length;
    const Cr = new Float64Array(t);
    for (let i = 0; i < m; i++) {
      const ri = r[i];
      if (ri === 0) continue;
      for (let u = 0; u < t; u++) Cr[u] += f.C[i * t + u] * ri;
    }
    for (let u = 0; u < t; u++) {
      const cu = Cr[u];
      if (cu === 0) continue;
      for (let a = 0; a < kf; a++) g[f.columns[a]] += f.E[u * kf + a] * cu;
    }
  });
  return g;
}

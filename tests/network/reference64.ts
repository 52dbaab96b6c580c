/**
 * Float64 plain-JS re-implementation of the networks' forward passes (values only), written
 * from the formulas in the headers of src/network/features.ts, mlp.ts, field-net.ts and
 * propagator-net.ts, sharing no code with them. Derivatives of these values are taken by
 * central finite differences in float64, which gives the tests an independent oracle for
 * every derivative channel the tfjs jets compute in float32.
 */

export interface Dense64 {
  kernel: Float64Array; // [in, out] row-major
  bias: Float64Array;
  fanIn: number;
  fanOut: number;
}

export type Mlp64 = Dense64[];

/** Read the layers `${prefix}/layer${l}/kernel|bias` from named weights. */
export function readMlp(named: { name: string; tensor: { shape: number[]; dataSync(): ArrayLike<number> } }[], prefix: string): Mlp64 {
  const layers: Mlp64 = [];
  for (let l = 0; ; l++) {
    const k = named.find((w) => w.name === `${prefix}/layer${l}/kernel`);
    const b = named.find((w) => w.name === `${prefix}/layer${l}/bias`);
    if (!k || !b) break;
    layers.push({ kernel: Float64Array.from(k.tensor.dataSync()), bias: Float64Array.from(b.tensor.dataSync()), fanIn: k.tensor.shape[0], fanOut: k.tensor.shape[1] });
  }
  if (layers.length === 0) throw new Error(`no layers named ${prefix}/layer0/…`);
  return layers;
}

export function mlp64(layers: Mlp64, activation: 'tanh' | 'sin', input: number[]): number[] {
  let z = input;
  layers.forEach((L, l) => {
    const out = new Array<number>(L.fanOut);
    for (let j = 0; j < L.fanOut; j++) {
      let acc = L.bias[j];
      for (let i = 0; i < L.fanIn; i++) acc += z[i] * L.kernel[i * L.fanOut + j];
      out[j] = l < layers.length - 1 ? (activation === 'tanh' ? Math.tanh(acc) : Math.sin(acc)) : acc;
    }
    z = out;
  });
  return z;
}

export function features64(x: number, period: number, modes: number): number[] {
  const f: number[] = [];
  for (let m = 1; m <= modes; m++) {
    const k = (2 * Math.PI * m) / period;
    f.push(Math.sin(k * x), Math.cos(k * x));
  }
  return f;
}

/** Options of the soft constraints (propagator-net.ts header): scaled x input, free first piece. */
export interface Soft64 {
  periodicity?: boolean;
  initialCondition?: boolean;
}

/**
 * u = ln q by the piecewise formula: u = U_k(x) + (s − s_k) n_k(x, (s − s_k)/Δ_k); with a
 * soft initial condition the first piece is n_0 itself (factor 1 in place of s − s_0 and Δ_0),
 * with soft periodicity x enters as 2x/L − 1.
 */
export function logQ64(pieces: Mlp64[], bounds: number[], activation: 'tanh' | 'sin', period: number, modes: number, x: number, s: number, forcePiece?: number, soft: Soft64 = {}): number[] {
  let k = 0;
  for (let j = bounds.length - 2; j > 0; j--) {
    if (s >= bounds[j]) {
      k = j;
      break;
    }
  }
  if (forcePiece !== undefined) k = forcePiece;
  const fx = soft.periodicity ? [(2 * x) / period - 1] : features64(x, period, modes);
  const d = bounds[k + 1] - bounds[k];
  const factor = (j: number, offset: number) => (soft.initialCondition && j === 0 ? 1 : offset);
  const nk = mlp64(pieces[k], activation, [...fx, (s - bounds[k]) / d]);
  const u = nk.map((v) => factor(k, s - bounds[k]) * v);
  for (let j = 0; j < k; j++) {
    const nj = mlp64(pieces[j], activation, [...fx, 1]);
    for (let c = 0; c < u.length; c++) u[c] += factor(j, bounds[j + 1] - bounds[j]) * nj[c];
  }
  return u;
}

/** Central differences of a scalar function g at t: first (step h1) and second (step h2) derivative. */
export function fd(g: (t: number) => number, t: number, h1 = 1e-5, h2 = 1e-4): { d1: number; d2: number } {
  const d1 = (g(t + h1) - g(t - h1)) / (2 * h1);
  const d2 = (g(t + h2) - 2 * g(t) + g(t - h2)) / (h2 * h2);
  return { d1, d2 };
}

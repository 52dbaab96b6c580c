/**
 * The parameter box of a surrogate: which of χN, f, b_A/b_B vary, their ranges, the anchor
 * grid (reference solves), held-out points, uniform draws, and the networks' normalised
 * inputs θ̂ = (θ − mid)/half-range ∈ [−1, 1] per varying parameter.
 * χN and f as in docs/physics.md; a ratio r = b_A/b_B is the chain's segmentRatio (segment lengths { A: r, B: 1 }).
 */
import { InputError } from '../io/errors.js';
import { formatNumber } from '../io/number-format.js';
import type { SurrogateConfig } from '../io/schemas/surrogate-config.js';
import type { SystemSpec } from '../physics/chain-schema.js';
import { buildChain, ModelError } from '../physics/chain.js';
import type { Chain } from '../physics/chain.js';
import { Xorshift128 } from '../numerics/random.js';
import { pointSystem } from '../sweep/grid.js';

export const PARAMETER_NAMES = ['chiN', 'f', 'segmentRatio'] as const;
export type ParameterName = (typeof PARAMETER_NAMES)[number];
export type ParameterPoint = Record<ParameterName, number>;

/** Flag names of the parameters (predict) and their symbols in messages. */
export const PARAMETER_LABELS: Record<ParameterName, { flag: string; symbol: string }> = {
  chiN: { flag: '--chiN', symbol: 'χN' },
  f: { flag: '--f', symbol: 'f' },
  segmentRatio: { flag: '--segment-ratio', symbol: 'b_A/b_B' },
};

export interface Axis {
  name: ParameterName;
  min: number;
  max: number;
  anchors: number;
}

export class ParameterSpace {
  /** The varying parameters, in the order chiN, f, segmentRatio. */
  readonly axes: Axis[];
  /** Values of the parameters that do not vary. */
  readonly fixed: Partial<ParameterPoint>;

  constructor(readonly config: Pick<SurrogateConfig, 'system' | 'parameters'>) {
    const axes: Axis[] = [];
    const fixed: Partial<ParameterPoint> = {};
    for (const name of PARAMETER_NAMES) {
      const p = config.parameters[name];
      if (typeof p === 'number') fixed[name] = p;
      else axes.push({ name, min: p.min, max: p.max, anchors: p.anchors });
    }
    this.axes = axes;
    this.fixed = fixed;
  }

  get dimension(): number {
    return this.axes.length;
  }

  /** The full point from the varying values (in axis order). */
  point(values: ArrayLike<number>): ParameterPoint {
    const p = { ...this.fixed } as ParameterPoint;
    this.axes.forEach((a, i) => (p[a.name] = values[i]));
    return p;
  }

  values(p: ParameterPoint): number[] {
    return this.axes.map((a) => p[a.name]);
  }

  /** θ̂ ∈ [−1, 1] per varying parameter (outside the box beyond ±1). */
  normalised(p: ParameterPoint): number[] {
    return this.axes.map((a) => (2 * (p[a.name] - a.min)) / (a.max - a.min) - 1);
  }

  system(p: ParameterPoint): SystemSpec {
    return pointSystem(this.config, p);
  }

  chain(p: ParameterPoint): Chain {
    return buildChain(this.system(p).chain);
  }

  /** Evenly spaced values of one axis, ends exact. */
  static axisValues(a: Axis, count = a.anchors): number[] {
    return Array.from({ length: count }, (_, i) => (i === count - 1 ? a.max : a.min + ((a.max - a.min) * i) / (count - 1)));
  }

  /** The anchor grid, first axis fastest. */
  anchors(): ParameterPoint[] {
    return this.grid(this.axes.map((a) => ParameterSpace.axisValues(a)));
  }

  private grid(values: number[][]): ParameterPoint[] {
    const out: ParameterPoint[] = [];
    const idx = values.map(() => 0);
    const total = values.reduce((n, v) => n * v.length, 1);
    for (let k = 0; k < total; k++) {
      out.push(this.point(idx.map((i, d) => values[d][i])));
      for (let d = 0; d < idx.length; d++) {
        if (++idx[d] < values[d].length) break;
        idx[d] = 0;
      }
    }
    return out;
  }

  /** Centres of the anchor cells (midpoints between neighbouring anchors on every axis). */
  cellCentres(): ParameterPoint[] {
    return this.grid(
      this.axes.map((a) => {
        const v = ParameterSpace.axisValues(a);
        return v.slice(1).map((x, i) => 0.5 * (x + v[i]));
      }),
    );
  }

  /** A uniform draw in the box. */
  draw(rng: Xorshift128): ParameterPoint {
    return this.point(this.axes.map((a) => a.min + (a.max - a.min) * rng.next()));
  }

  /** Held-out points: the anchor-cell centres, then `random` seeded uniform draws. */
  heldOut(random: number, seed: number): ParameterPoint[] {
    const rng = new Xorshift128(seed);
    return [...this.cellCentres(), ...Array.from({ length: random }, () => this.draw(rng))];
  }

  /** Why p lies outside the trained box (one message per parameter), or [] inside it. */
  outside(p: ParameterPoint): string[] {
    const out: string[] = [];
    for (const a of this.axes) {
      const { flag, symbol } = PARAMETER_LABELS[a.name];
      if (!(p[a.name] >= a.min && p[a.name] <= a.max)) out.push(`${flag}: got ${formatNumber(p[a.name])}; the surrogate was trained for ${symbol} in [${formatNumber(a.min)}, ${formatNumber(a.max)}]`);
    }
    return out;
  }

  /**
   * Parameters given away from the value the surrogate was trained at: its network has no
   * input for them, so no answer exists there (refused even when extrapolation is allowed).
   */
  offFixed(p: ParameterPoint): string[] {
    const out: string[] = [];
    for (const name of PARAMETER_NAMES) {
      const { flag, symbol } = PARAMETER_LABELS[name];
      if (this.axes.some((x) => x.name === name)) continue;
      if (p[name] !== this.fixed[name]) out.push(`${flag}: got ${formatNumber(p[name])}; the surrogate was trained at the fixed ${symbol} = ${formatNumber(this.fixed[name])} only (it has no input for ${symbol}; train a surrogate over a range of ${symbol})`);
    }
    return out;
  }

  /** Whether the chain reads the same from both ends everywhere in the box (checked at every corner and the centre). */
  palindromicEverywhere(): boolean {
    const corners = this.grid(this.axes.map((a) => [a.min, a.max]));
    const centre = this.point(this.axes.map((a) => 0.5 * (a.min + a.max)));
    return [...corners, centre].every((p) => this.chain(p).palindromic);
  }

  describe(p: ParameterPoint): string {
    return PARAMETER_NAMES.filter((n) => this.axes.some((a) => a.name === n) || n === 'chiN')
      .map((n) => `${PARAMETER_LABELS[n].symbol} = ${+p[n].toPrecision(6)}`)
      .join(', ');
  }
}

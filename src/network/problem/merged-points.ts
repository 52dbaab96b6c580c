/**
 * The grid and the extra points of each propagator as one point set, so that a training
 * step makes one network pass per propagator instead of two (rows: the grid first, then the
 * extra points). Built once per set of extra points, and rebuilt when they are redrawn.
 */
import type { Tf } from '../../autodiff/tf.js';
import type { SystemSpec } from '../../physics/chain-schema.js';
import type { ScftNetworks } from '../scft-networks.js';
import type { PointFields } from './point-fields.js';
import { joinPointSets } from './point-set.js';
import type { PointSet } from './point-set.js';

export class MergedPoints {
  private merged: { for: PointSet; q: PointSet; qDagger: PointSet } | null = null;

  constructor(
    readonly tf: Tf,
    readonly nets: ScftNetworks,
    readonly system: SystemSpec,
    /** Where the merged sets' kept fields live (dropped with the sets). */
    readonly fields: PointFields,
  ) {}

  /** [q, q†] merged sets of the grid and these extra points. */
  of(grid: { q: PointSet; qDagger: PointSet }, extra: { q: PointSet; qDagger: PointSet }): [PointSet, PointSet] {
    if (this.merged?.for !== extra.q) {
      this.dispose();
      const { tf, nets, system } = this;
      this.merged = { for: extra.q, q: joinPointSets(tf, nets, system, grid.q, extra.q), qDagger: joinPointSets(tf, nets, system, grid.qDagger, extra.qDagger) };
    }
    return [this.merged.q, this.merged.qDagger];
  }

  dispose(): void {
    if (!this.merged) return;
    for (const set of [this.merged.q, this.merged.qDagger]) {
      this.fields.forget(set);
      set.dispose();
    }
    this.merged = null;
  }
}

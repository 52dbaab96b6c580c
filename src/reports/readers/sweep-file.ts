/**
 * A sweep table (kind "sweep-table", sweep/merge.ts) or one shard of it (kind "sweep-shard"),
 * read through their schemas (io/formats/sweep.ts) → the sweep section's input, each point
 * with the RPA spinodal of its chain, and a film sweep's F(H) curves (film-sweep.ts).
 */
import { InputError } from '../../io/errors.js';
import type { ShardFile, SweepTable } from '../../io/formats/sweep.js';
import { buildChain } from '../../physics/chain.js';
import type { SystemSpec } from '../../physics/chain-schema.js';
import { spinodal } from '../../physics/rpa.js';
import { pointSystem } from '../../sweep/grid.js';
import type { SweepInput } from '../report-inputs.js';
import { readFilmSweep } from './film-sweep.js';

export function readSweep(file: ShardFile | SweepTable, path: string): { sweep: SweepInput; system: SystemSpec; config: unknown; solverSeconds: number } {
  const config = file.config;
  if (file.points.length === 0) throw new InputError(`${path}: points: the sweep holds no solved point yet; a sweep report needs at least one`);
  const spinodals = new Map<string, number>();
  const points = file.points.map((p) => {
    const key = `${p.f}|${p.segmentRatio}`;
    if (!spinodals.has(key)) spinodals.set(key, spinodal(buildChain(pointSystem(config, p).chain)).chiN);
    return { chiN: p.chiN, f: p.f, segmentRatio: p.segmentRatio, phase: p.phase, period: p.period, freeEnergy: p.freeEnergy, freeEnergyDisordered: p.freeEnergyDisordered, Q: p.Q, converged: p.converged, spinodalChiN: spinodals.get(key)! };
  });
  const system = pointSystem(config, file.points[0]);
  const film = readFilmSweep(file);
  return { sweep: { points, chainLabel: buildChain(system.chain).label, ...(film ? { film } : {}) }, system, config, solverSeconds: file.points.reduce((a, p) => a + p.seconds, 0) };
}

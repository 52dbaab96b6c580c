/**
 * The solution file kind: an ScftSolution (from any solver) as JSON, plus a grid CSV.
 * Float64 values are written with full round-trip precision (JSON numbers).
 */
import { z } from 'zod';
import { systemSchema } from '../physics/chain-schema.js';
import { buildChain } from '../physics/chain.js';
import type { ScftSolution } from '../physics/result.js';
import type { Provenance } from './versions.js';

export interface SolutionSummary {
  solver: ScftSolution['solver'];
  chain: string;
  chiN: number;
  f: number;
  period: number;
  periodTolerance?: number;
  length: number;
  periods: number;
  nx: number;
  ns: number;
  freeEnergy: number;
  freeEnergyDisordered: number | null;
  freeEnergyExcess: number | null;
  Q: number;
  QDagger: number;
  phase: ScftSolution['phase'];
  amplitude: number;
  iterations: number;
  residual: number;
  converged: boolean;
  seconds: number;
  notes: string[];
}

export function summarize(sol: ScftSolution, extra: { periodTolerance?: number } = {}): SolutionSummary {
  const chain = buildChain(sol.system.chain);
  const fd = Number.isFinite(sol.freeEnergyDisordered) ? sol.freeEnergyDisordered : null;
  return {
    solver: sol.solver,
    chain: chain.label,
    chiN: sol.system.chiN,
    f: chain.speciesFraction.A,
    period: sol.period,
    ...(extra.periodTolerance !== undefined ? { periodTolerance: extra.periodTolerance } : {}),
    length: sol.length,
    periods: sol.periods,
    nx: sol.nx,
    ns: sol.ns,
    freeEnergy: sol.freeEnergy,
    freeEnergyDisordered: fd,
    freeEnergyExcess: fd === null ? null : sol.freeEnergy - fd,
    Q: sol.Q,
    QDagger: sol.QDagger,
    phase: sol.phase,
    amplitude: sol.amplitude,
    iterations: sol.iterations,
    residual: sol.residual,
    converged: sol.converged,
    seconds: sol.seconds,
    notes: sol.notes,
  };
}

const numArray = z.array(z.number());

export const solutionFileSchema = z
  .object({
    kind: z.literal('solution'),
    version: z.literal(1),
    provenance: z.record(z.string(), z.unknown()),
    config: z.unknown().optional(),
    system: systemSchema,
    summary: z.record(z.string(), z.unknown()).and(
      // periods: 0 for a film (a thickness between walls, no period).
      z.object({ length: z.number().gt(0), periods: z.number().int().min(0), nx: z.number().int(), ns: z.number().int(), phase: z.string() }),
    ),
    grid: z.object({ x: numArray, phiA: numArray, phiB: numArray, wA: numArray, wB: numArray }),
    propagators: z.object({ s: numArray, q: z.array(numArray), qDagger: z.array(numArray) }).optional(),
  })
  .superRefine((v, ctx) => {
    const n = v.summary.nx;
    for (const k of ['x', 'phiA', 'phiB', 'wA', 'wB'] as const) {
      if (v.grid[k].length !== n) ctx.addIssue({ code: 'custom', path: ['grid', k], message: `must hold summary.nx = ${n} values` });
    }
  });

export type SolutionFile = z.infer<typeof solutionFileSchema>;

export function solutionToFile(sol: ScftSolution, provenance: Provenance, config?: unknown, extra: { periodTolerance?: number } = {}): SolutionFile {
  return {
    kind: 'solution',
    version: 1,
    provenance: { ...provenance },
    ...(config !== undefined ? { config } : {}),
    system: sol.system,
    summary: summarize(sol, extra) as unknown as SolutionFile['summary'],
    grid: { x: Array.from(sol.x), phiA: Array.from(sol.phi.A), phiB: Array.from(sol.phi.B), wA: Array.from(sol.w.A), wB: Array.from(sol.w.B) },
    ...(sol.propagators
      ? { propagators: { s: Array.from(sol.propagators.s), q: sol.propagators.q.map((r) => Array.from(r)), qDagger: sol.propagators.qDagger.map((r) => Array.from(r)) } }
      : {}),
  };
}

export function solutionGridCsv(sol: ScftSolution): string {
  const rows = ['x,phiA,phiB,wA,wB'];
  for (let j = 0; j < sol.nx; j++) rows.push([sol.x[j], sol.phi.A[j], sol.phi.B[j], sol.w.A[j], sol.w.B[j]].map((v) => v.toPrecision(17)).join(','));
  return `${rows.join('\n')}\n`;
}

/** q(x, s) as a long CSV: s, x, q, qDagger. */
export function propagatorCsv(sol: ScftSolution): string | undefined {
  const p = sol.propagators;
  if (!p) return undefined;
  const rows = ['s,x,q,qDagger'];
  const ns = p.s.length - 1;
  for (let i = 0; i <= ns; i++) for (let j = 0; j < sol.nx; j++) rows.push(`${p.s[i]},${sol.x[j].toPrecision(17)},${p.q[i][j].toPrecision(17)},${p.qDagger[i][j].toPrecision(17)}`);
  return `${rows.join('\n')}\n`;
}

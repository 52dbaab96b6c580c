/**
 * File kind "solution" (version 2): an ScftSolution from any solver (spectral reference,
 * network, surrogate, inversion fit) as JSON, plus its grid CSV. Float64 values are JSON
 * numbers (round-trip exact). Lengths in Rg, fields and free energies in kT per chain
 * (docs/physics.md); the A-domain centre at x = 0 (physics/phase-convention.ts).
 * Written and read only through `solutionFileSchema`.
 */
import { z } from 'zod';
import { systemSchema } from '../../physics/chain-schema.js';
import { buildChain } from '../../physics/chain.js';
import { bulkPhaseNote } from '../../physics/lamellar-window.js';
import type { ScftSolution } from '../../physics/result.js';
import type { Provenance } from '../versions.js';
import { formatHeader, provenanceSchema } from './file-format.js';

export const SOLUTION_VERSION = 2;

const numArray = z.array(z.number());
const finiteOrNull = z.number().nullable();

/** The cell a solution lives in (physics/cell/cell.ts CellDescription; make-cell.ts rebuilds it). */
export const cellDescriptionSchema = z.discriminatedUnion('kind', [
  z.object({ kind: z.literal('periodic'), length: z.number().gt(0), n: z.number().int().min(1), periods: z.number().int().min(1) }).strict(),
  z
    .object({
      kind: z.literal('film'),
      length: z.number().gt(0),
      n: z.number().int().min(1),
      walls: z.object({ bottom: z.object({ affinity: z.number() }).strict(), top: z.object({ affinity: z.number() }).strict(), range: z.number() }).strict(),
    })
    .strict(),
]);

/** The numbers of a solution: what `solve --json` prints and every file of a solution carries. */
export const solutionSummarySchema = z
  .object({
    solver: z.enum(['spectral', 'network', 'surrogate']),
    /** Chain label (physics/chain.ts), e.g. "A0.500-B0.500". */
    chain: z.string(),
    chiN: z.number(),
    f: z.number(),
    /** Lamellar period (Rg); null for a disordered result (no period) or a film. */
    period: finiteOrNull,
    /** Relative tolerance of the stress-free period search, when one ran. */
    periodTolerance: z.number().optional(),
    /** Cell length (Rg): `periods` periods, or a film's thickness. */
    length: z.number().gt(0),
    periods: z.number().int().min(0),
    nx: z.number().int().min(1),
    ns: z.number().int().min(1),
    /** Contour steps on each block of the chain, in chain order (they sum to ns). */
    contourSteps: z.array(z.number().int().min(1)).optional(),
    freeEnergy: z.number(),
    freeEnergyDisordered: finiteOrNull,
    /** F − F_disordered (kT per chain); null for a disordered result, where it is 0 by construction. */
    freeEnergyExcess: finiteOrNull,
    Q: z.number(),
    QDagger: z.number(),
    phase: z.enum(['lamellar', 'disordered', 'homogeneous-melt', 'single-chain']),
    amplitude: z.number(),
    iterations: z.number().int().min(0),
    residual: z.number(),
    converged: z.boolean(),
    seconds: z.number(),
    notes: z.array(z.string()),
  })
  .strict();

export type SolutionSummary = z.infer<typeof solutionSummarySchema>;

/** One F(L) evaluation of the stress-free period search (spectral/period-search.ts). */
export const periodTrialSchema = z.object({ period: z.number(), freeEnergy: z.number(), phase: z.string(), iterations: z.number() }).strict();

/** What a film solve adds: the layers (bottom first) and the free energy per area. */
export const filmSummarySchema = z.object({ layers: z.object({ A: z.number().int().min(0), B: z.number().int().min(0), sequence: z.string() }).strict(), freeEnergyPerArea: z.number() }).strict();

/** F(H) of a film over thicknesses (spectral/thickness-scan.ts ThicknessScan); H in Rg. */
export const thicknessScanSchema = z
  .object({
    points: z.array(
      z.object({ thickness: z.number(), freeEnergy: z.number(), freeEnergyPerArea: z.number(), freeEnergyDisordered: z.number().nullable(), phase: z.string(), layers: z.string(), converged: z.boolean() }).strict(),
    ),
    minima: z.array(z.object({ thickness: z.number(), freeEnergy: z.number(), layers: z.string() }).strict()),
    stable: z.array(z.number()),
    /** The one grid of the whole scan, its wall time, and the terrace prediction for the film's thickness (spectral/film-scan-run.ts). */
    nx: z.number().int().optional(),
    ns: z.number().int().optional(),
    seconds: z.number().optional(),
    terraces: z
      .object({ meanThickness: z.number(), kind: z.enum(['uniform', 'terraces']), thicknesses: z.array(z.number()), areaShares: z.array(z.number()), gain: z.number() })
      .strict()
      .optional(),
  })
  .strict();

export const solutionFileSchema = z
  .object({
    ...formatHeader('solution', SOLUTION_VERSION),
    provenance: provenanceSchema,
    /** The config that made the solution, as given (any config kind). */
    config: z.record(z.string(), z.unknown()).optional(),
    system: systemSchema,
    cell: cellDescriptionSchema,
    summary: solutionSummarySchema,
    /** The period search's F(L) evaluations, when one ran. */
    periodSearch: z.array(periodTrialSchema).optional(),
    /** A film solve: the A/B layers counted from the bottom wall, and F per unit area (kT ρ₀Rg/N, docs/physics.md). */
    film: filmSummarySchema.optional(),
    /** A film's F(H) scan (spectral/thickness-scan.ts), when the run made one: the report draws it. */
    thicknessScan: thicknessScanSchema.optional(),
    /** Wall time (s) of the whole run that made the file (a solve's period search included), when it recorded one. */
    runSeconds: z.number().min(0).optional(),
    grid: z.object({ x: numArray, phiA: numArray, phiB: numArray, wA: numArray, wB: numArray }).strict(),
    propagators: z.object({ s: numArray, q: z.array(numArray), qDagger: z.array(numArray) }).strict().optional(),
  })
  .strict()
  .superRefine((v, ctx) => {
    const n = v.summary.nx;
    for (const k of ['x', 'phiA', 'phiB', 'wA', 'wB'] as const) {
      if (v.grid[k].length !== n) ctx.addIssue({ code: 'custom', path: ['grid', k], message: `must hold summary.nx = ${n} values` });
    }
    if (v.cell.n !== n) ctx.addIssue({ code: 'custom', path: ['cell', 'n'], message: `must equal summary.nx = ${n}` });
    if (Math.abs(v.cell.length - v.summary.length) > 1e-12 * v.summary.length) ctx.addIssue({ code: 'custom', path: ['cell', 'length'], message: `must equal summary.length = ${v.summary.length} Rg` });
    const p = v.propagators;
    if (!p) return;
    const ns = v.summary.ns;
    if (p.s.length !== ns + 1) ctx.addIssue({ code: 'custom', path: ['propagators', 's'], message: `must hold summary.ns + 1 = ${ns + 1} contour points` });
    for (const k of ['q', 'qDagger'] as const) {
      if (p[k].length !== ns + 1) ctx.addIssue({ code: 'custom', path: ['propagators', k], message: `must hold summary.ns + 1 = ${ns + 1} rows (one per contour point)` });
      const bad = p[k].findIndex((r) => r.length !== n);
      if (bad >= 0) ctx.addIssue({ code: 'custom', path: ['propagators', k, bad], message: `must hold summary.nx = ${n} values` });
    }
  });

export type SolutionFile = z.infer<typeof solutionFileSchema>;

const finite = (v: number): number | null => (Number.isFinite(v) ? v : null);

export function summarize(sol: ScftSolution, extra: { periodTolerance?: number } = {}): SolutionSummary {
  const chain = buildChain(sol.system.chain);
  const fd = finite(sol.freeEnergyDisordered);
  const disordered = sol.phase === 'disordered';
  return {
    solver: sol.solver,
    chain: chain.label,
    chiN: sol.system.chiN,
    f: chain.speciesFraction.A,
    period: disordered ? null : finite(sol.period),
    ...(extra.periodTolerance !== undefined && !disordered ? { periodTolerance: extra.periodTolerance } : {}),
    length: sol.length,
    periods: sol.periods,
    nx: sol.nx,
    ns: sol.ns,
    contourSteps: sol.contour.blocks.map((b) => b.steps),
    freeEnergy: sol.freeEnergy,
    freeEnergyDisordered: fd,
    freeEnergyExcess: fd === null || disordered ? null : sol.freeEnergy - fd,
    Q: sol.Q,
    QDagger: sol.QDagger,
    phase: sol.phase,
    amplitude: sol.amplitude,
    iterations: sol.iterations,
    residual: sol.residual,
    converged: sol.converged,
    seconds: sol.seconds,
    notes: [...sol.notes, ...[bulkPhaseNote(sol.phase, sol.system.chain, sol.system.chiN)].filter((n): n is string => n !== undefined)],
  };
}

export interface SolutionFileExtras {
  periodTolerance?: number;
  periodSearch?: z.input<typeof periodTrialSchema>[];
  film?: z.input<typeof filmSummarySchema>;
  /** A film's F(H) scan (spectral/film-scan-run.ts). */
  thicknessScan?: z.input<typeof thicknessScanSchema>;
  runSeconds?: number;
}

/** The solution file of a solution, built through the schema (validated before it is written). */
export function solutionToFile(sol: ScftSolution, provenance: Provenance, config?: Record<string, unknown>, extra: SolutionFileExtras = {}): SolutionFile {
  return solutionFileSchema.parse({
    kind: 'solution',
    version: SOLUTION_VERSION,
    provenance: { ...provenance },
    ...(config !== undefined ? { config } : {}),
    system: sol.system,
    cell: sol.cell.describe(),
    summary: summarize(sol, extra),
    ...(extra.periodSearch ? { periodSearch: extra.periodSearch } : {}),
    ...(extra.film ? { film: extra.film } : {}),
    ...(extra.thicknessScan ? { thicknessScan: extra.thicknessScan } : {}),
    ...(extra.runSeconds !== undefined ? { runSeconds: extra.runSeconds } : {}),
    grid: { x: Array.from(sol.x), phiA: Array.from(sol.phi.A), phiB: Array.from(sol.phi.B), wA: Array.from(sol.w.A), wB: Array.from(sol.w.B) },
    ...(sol.propagators
      ? { propagators: { s: Array.from(sol.propagators.s), q: sol.propagators.q.map((r) => Array.from(r)), qDagger: sol.propagators.qDagger.map((r) => Array.from(r)) } }
      : {}),
  });
}

/** The JSON text of a solution file. */
export function solutionText(file: SolutionFile): string {
  return `${JSON.stringify(file, null, 1)}\n`;
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
  for (let i = 0; i < ns + 1; i++) for (let j = 0; j < sol.nx; j++) rows.push(`${p.s[i]},${sol.x[j].toPrecision(17)},${p.q[i][j].toPrecision(17)},${p.qDagger[i][j].toPrecision(17)}`);
  return `${rows.join('\n')}\n`;
}

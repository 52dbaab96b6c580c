/**
 * Schema pieces for the spectral reference: the cell and the solver settings.
 * Shared by every config kind that runs a reference solve.
 */
import { z } from 'zod';

const powerOfTwo = z
  .number()
  .int()
  .min(8)
  .max(8192)
  .refine((n) => (n & (n - 1)) === 0, { message: 'must be a power of two (8, 16, …, 8192): the FFT needs it' })
  .meta({ constraint: 'a power of two' });

/** Grid points: a power of two (the FFT needs it). */
export const gridPointsSchema = powerOfTwo;
/** Contour steps over the whole chain, spread over the blocks (each block an even number of its own). */
export const contourStepsSchema = z.number().int().min(4).max(20000);

/** One wall of a film: its affinity for A (kT per chain × Rg; > 0 attracts A, < 0 attracts B, 0 neutral). */
const wallSchema = z.object({ affinity: z.number().min(-100).max(100).default(0) }).strict();

export const wallsSchema = z
  .object({
    bottom: wallSchema.prefault({}),
    top: wallSchema.prefault({}),
    /** Range λ (Rg) of the walls' short-range surface field (a half-Gaussian of standard deviation λ). */
    range: z.number().gt(0).max(5).default(0.25),
  })
  .strict();

const cellFields = z
  .object({
    /** "periodic": a lamellar cell with periodic boundaries; "film": a film between two flat walls. */
    kind: z.enum(['periodic', 'film']).default('periodic'),
    /** Periodic: lamellar period in Rg, or "equilibrium" for the stress-free period (default). */
    period: z.union([z.number().gt(0).lte(200), z.literal('equilibrium')]).optional(),
    /** Periodic: whole lamellar periods in the cell (default 1). */
    periods: z.number().int().min(1).max(16).optional(),
    /** Film: thickness H in Rg (walls at z = 0 and z = H). */
    thickness: z.number().gt(0).lte(500).optional(),
    /** Film: the walls (affinities, range of the surface field). */
    walls: wallsSchema.optional(),
    /** Grid points, or "auto": chosen from χN, the segment lengths and the cell length, and checked after the solve (spectral/resolution.ts). */
    nx: z.union([gridPointsSchema, z.literal('auto')]).default('auto'),
    /** Contour steps over the chain, or "auto": chosen from χN and checked by the Richardson estimate after the solve. */
    ns: z.union([contourStepsSchema, z.literal('auto')]).default('auto'),
  })
  .strict();

export type PeriodicCellSpec = { kind: 'periodic'; period: number | 'equilibrium'; periods: number; nx: number | 'auto'; ns: number | 'auto' };
export type FilmCellSpec = { kind: 'film'; thickness: number; walls: z.infer<typeof wallsSchema>; nx: number | 'auto'; ns: number | 'auto' };
export type CellSpec = PeriodicCellSpec | FilmCellSpec;

export const cellSchema = cellFields
  .meta({ constraint: 'kind "film" needs thickness and takes walls, not period or periods; kind "periodic" takes period and periods, not thickness or walls' })
  .superRefine((c, ctx) => {
    const film = c.kind === 'film';
    if (film && c.thickness === undefined) ctx.addIssue({ code: 'custom', path: ['thickness'], message: 'a film (kind "film") needs its thickness in Rg' });
    const foreign = film ? (['period', 'periods'] as const) : (['thickness', 'walls'] as const);
    for (const k of foreign) {
      if (c[k] !== undefined) ctx.addIssue({ code: 'custom', path: [k], message: film ? 'a film has a thickness, not a period: remove it' : 'only a film (cell.kind "film") has it: remove it, or set cell.kind to "film"' });
    }
  })
  .transform(
    (c): CellSpec =>
      c.kind === 'film'
        ? { kind: 'film', thickness: c.thickness!, walls: c.walls ?? wallsSchema.parse({}), nx: c.nx, ns: c.ns }
        : { kind: 'periodic', period: c.period ?? 'equilibrium', periods: c.periods ?? 1, nx: c.nx, ns: c.ns },
  );

export const startSchema = z.discriminatedUnion('type', [
  z
    .object({
      type: z.literal('cosine'),
      /** Amplitude of φ_A − f in the initial composition guess. */
      amplitude: z.number().gt(0).lt(1).default(0.3),
    })
    .strict(),
  z.object({ type: z.literal('rpa') }).strict(),
  z.object({ type: z.literal('file'), path: z.string().min(1) }).strict(),
]);

export const spectralSchema = z
  .object({
    /** Stop when max |w_out − w_in| (kT) falls below this. */
    tolerance: z.number().gt(0).lt(1).default(1e-9),
    maxIterations: z.number().int().min(1).max(100000).default(2000),
    /**
     * Anderson history length ("auto": 20, and χN/2.5 above χN = 50, at most 100: the slowly
     * converging modes multiply at strong segregation) and mixing parameter λ.
     */
    andersonHistory: z.union([z.number().int().min(0).max(200), z.literal('auto')]).default('auto'),
    andersonMixing: z.number().gt(0).lte(1).default(1),
    /** Simple-mixing steps before Anderson starts, and their mixing parameter. */
    simpleSteps: z.number().int().min(0).max(10000).default(5),
    simpleMixing: z.number().gt(0).lte(1).default(0.1),
    richardson: z.boolean().default(true),
    start: startSchema.default({ type: 'cosine', amplitude: 0.3 }),
    /** Relative tolerance on the period when cell.period is "equilibrium". */
    periodTolerance: z.number().gt(0).lt(0.1).default(1e-5),
  })
  .strict();

export type SpectralOptions = z.infer<typeof spectralSchema>;
export type StartSpec = z.infer<typeof startSchema>;

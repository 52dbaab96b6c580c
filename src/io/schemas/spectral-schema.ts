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
  .refine((n) => (n & (n - 1)) === 0, { message: 'must be a power of two (8, 16, …, 8192): the FFT needs it' });

export const cellSchema = z
  .object({
    /** Lamellar period in Rg, or "optimize" to find the stress-free period. */
    period: z.union([z.number().gt(0).lte(200), z.literal('optimize')]).default('optimize'),
    /** Whole lamellar periods in the cell. */
    periods: z.number().int().min(1).max(16).default(1),
    nx: powerOfTwo.default(64),
    /** Contour steps over the whole chain; every block must get an even whole number. */
    ns: z.number().int().min(2).max(20000).default(100),
  })
  .strict();

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
    /** Anderson history length and mixing parameter λ. */
    andersonHistory: z.number().int().min(0).max(50).default(20),
    andersonMixing: z.number().gt(0).lte(1).default(1),
    /** Simple-mixing steps before Anderson starts, and their mixing parameter. */
    simpleSteps: z.number().int().min(0).max(10000).default(5),
    simpleMixing: z.number().gt(0).lte(1).default(0.1),
    richardson: z.boolean().default(true),
    start: startSchema.default({ type: 'cosine', amplitude: 0.3 }),
    /** Relative tolerance on the period when cell.period is "optimize". */
    periodTolerance: z.number().gt(0).lt(0.1).default(1e-5),
  })
  .strict();

export type CellSpec = z.infer<typeof cellSchema>;
export type SpectralOptions = z.infer<typeof spectralSchema>;
export type StartSpec = z.infer<typeof startSchema>;

/**
 * Schema pieces for the neural networks (src/network): architecture and seed. The cell
 * period L and the block boundaries come from the cell and the chain, not from here.
 *
 * zod 4: an object default is returned as given, not parsed, so nest these with
 * .prefault({}) (parses {} and fills the field defaults) rather than .default({}).
 */
import { z } from 'zod';

const architectureShape = {
  /** Widths of the hidden layers, input side first. */
  hidden: z.array(z.number().int().min(1).max(512)).min(1).max(12).default([32, 32, 32]),
  /** Activation of the hidden layers (the output layer is linear). */
  activation: z.enum(['tanh', 'sin']).default('tanh'),
  /** Periodic input features sin, cos(2π m x / L) for m = 1..fourierModes (Dong & Ni 2021). */
  fourierModes: z.number().int().min(1).max(32).default(3),
  /** Seed of the Glorot initialisation; equal seeds give identical networks. */
  seed: z.number().int().min(0).max(0xffffffff).default(1),
};

/**
 * Network for the fields w_K(x): input features of x only. With no hidden layers ([]) it is
 * linear in the periodic features: a Fourier series of `fourierModes` modes (plus a constant),
 * which a least-squares fit to grid values determines exactly when the grid has more than
 * 2·fourierModes + 1 points, and which interpolates between them spectrally.
 */
export const fieldNetworkSchema = z
  .object({ ...architectureShape, hidden: z.array(z.number().int().min(1).max(512)).min(0).max(12).default([32, 32, 32]) })
  .strict();

/** Network for ln q(x, s) = s·n(x, s) (or n(x, s), soft initial condition), one piece for the whole chain or one per block. */
export const propagatorNetworkSchema = z
  .object({
    ...architectureShape,
    /**
     * 'single': one network over s ∈ [0, 1]. 'per-block': one network per block, joined
     * continuously at each junction, so ∂q/∂s may jump there as the MDE requires.
     */
    pieces: z.enum(['single', 'per-block']).default('per-block'),
    /**
     * 'exact': x enters through the periodic features above. 'soft': through 2x/L − 1 alone
     * (fourierModes unused), and the loss term `periodicity` penalises the mismatch of ln q
     * and ∂x ln q between x = 0 and x = L. The field network is exactly periodic either way.
     */
    periodicity: z.enum(['exact', 'soft']).default('exact'),
    /**
     * 'exact': ln q = s·n(x, s) on the first block, so q(x, 0) = 1 by construction. 'soft':
     * ln q = n(x, s) there, and the loss term `initial` penalises (ln q(x, 0))² on the x grid.
     */
    initialCondition: z.enum(['exact', 'soft']).default('exact'),
  })
  .strict();

export type FieldNetworkConfig = z.infer<typeof fieldNetworkSchema>;
export type PropagatorNetworkConfig = z.infer<typeof propagatorNetworkSchema>;

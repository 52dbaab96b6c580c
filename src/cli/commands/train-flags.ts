/** The flags of `train` (for a network or a surrogate config) and the --backend flag shared by the network commands. */
import { InputError } from '../../io/errors.js';

export interface TrainFlags {
  out?: string;
  overwrite?: boolean;
  resume?: string;
  json?: boolean;
  backend?: string;
  adamSteps?: string;
  lbfgsIterations?: string;
  report?: boolean;
  quiet?: boolean;
}

const BACKENDS = ['auto', 'native', 'wasm', 'cpu'] as const;

export function backendFlag(v: string | undefined): (typeof BACKENDS)[number] | undefined {
  if (v === undefined) return undefined;
  if (!(BACKENDS as readonly string[]).includes(v)) throw new InputError(`--backend: got ${JSON.stringify(v)}; allowed: ${BACKENDS.join(', ')}`);
  return v as (typeof BACKENDS)[number];
}

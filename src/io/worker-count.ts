import { availableParallelism } from 'node:os';

/** Worker threads to use when not told: both cores of a small machine, never more than 2. */
export function defaultWorkers(): number {
  return Math.min(2, availableParallelism());
}

/**
 * A command's work on a worker thread fails with its error's class name and message (threads/
 * task-worker.ts); the exit-code contract needs the classes back: bad input 2, a failed run 3.
 * Anything else stays a plain Error (an internal error), with the worker's stack kept by the pool.
 */
import { InputError, RunFailure } from '../io/errors.js';

export function errorFromWorker(e: { name: string; message: string }): Error {
  if (e.name === 'InputError' || e.name === 'ModelError') return new InputError(e.message);
  if (e.name === 'RunFailure') return new RunFailure(e.message);
  return Object.assign(new Error(e.message), { name: e.name });
}

/**
 * Independent tasks on K worker threads (each its own module graph: a tfjs instance, a
 * solver). Each free worker takes the next task, so a slow task does not hold up the
 * others; results are handed to onResult as they finish and returned in submission order,
 * so what the caller builds does not depend on the schedule. A worker's error (its class
 * name and message) rejects the run; a stop (the AbortSignal) or any failure terminates
 * every worker, and tasks not yet started never start.
 *
 * The worker entry answers through threads/task-worker.ts (serveTasks).
 */
import { Worker } from 'node:worker_threads';
import type { TaskMessage, WorkerReply } from './task-worker.js';

export interface WorkerPoolOptions<Task, Result, Progress> {
  /** The worker entry: its compiled path under src/ (e.g. "sweep/point-worker.js"), or a URL. */
  entry: string | URL;
  /** Sent once to every worker (its workerData): no functions, they do not cross threads. */
  workerData: unknown;
  /** Worker threads (at most one per task). */
  workers: number;
  /** Each result as it arrives, with the task's index in the submission order. */
  onResult?: (result: Result, index: number) => void;
  /** Progress a task reports (serveTasks' progress callback). */
  onProgress?: (progress: Progress, index: number) => void;
  /** The error a task's failure (or its worker's exit) becomes (default: an Error with the worker's name and message). */
  toError?: (error: { name: string; message: string; stack?: string }, task: Task, index: number) => Error;
  /** Stop: terminate the workers and reject with PoolStopped. */
  signal?: AbortSignal;
}

/** The run was stopped through its AbortSignal. */
export class PoolStopped extends Error {
  constructor() {
    super('stopped before all tasks finished');
    this.name = 'PoolStopped';
  }
}

/**
 * The compiled worker entry. Under vitest this module runs from src/*.ts, which a worker
 * thread cannot load; the tests build dist/ first, so take the compiled file from there.
 */
function entryUrl(entry: string | URL): URL {
  if (entry instanceof URL) return entry;
  const here = import.meta.url;
  return here.endsWith('.ts') ? new URL(`../../dist/${entry}`, here) : new URL(`../${entry}`, here);
}

const defaultError = (e: { name: string; message: string }): Error => Object.assign(new Error(e.message), { name: e.name });

/**
 * The worker's stack, kept under the error the pool raises (the thread's own frames would
 * otherwise be lost at the structured clone): what an internal error's crash file and --debug print.
 */
function withWorkerStack(e: Error, workerStack: string | undefined): Error {
  if (workerStack) e.stack = `${e.stack ?? `${e.name}: ${e.message}`}\n— raised in a worker thread:\n${workerStack}`;
  return e;
}

/** Run `tasks` on worker threads; the results in submission order. */
export async function runInWorkers<Task, Result, Progress = never>(tasks: Task[], options: WorkerPoolOptions<Task, Result, Progress>): Promise<Result[]> {
  const results: Result[] = new Array(tasks.length);
  if (tasks.length === 0) return results;
  if (options.signal?.aborted) throw new PoolStopped();
  const toError = options.toError ?? defaultError;
  const url = entryUrl(options.entry);
  const pool = Array.from({ length: Math.max(1, Math.min(options.workers, tasks.length)) }, () => new Worker(url, { workerData: options.workerData }));
  let next = 0;
  let finished = 0;
  let onAbort: (() => void) | undefined;
  try {
    await new Promise<void>((resolve, reject) => {
      let failed = false;
      const fail = (e: Error) => {
        failed = true;
        reject(e);
      };
      onAbort = () => fail(new PoolStopped());
      options.signal?.addEventListener('abort', onAbort, { once: true });
      const feed = (w: Worker, current: { index: number | null }) => {
        if (failed || next >= tasks.length) {
          current.index = null;
          return;
        }
        current.index = next++;
        const message: TaskMessage<Task> = { index: current.index, task: tasks[current.index] };
        w.postMessage(message);
      };
      for (const w of pool) {
        const current: { index: number | null } = { index: null };
        w.on('message', (m: WorkerReply<Result, Progress>) => {
          if (failed) return;
          if ('progress' in m) return void options.onProgress?.(m.progress, m.index);
          if ('error' in m) return fail(withWorkerStack(toError(m.error, tasks[m.index], m.index), m.error.stack));
          results[m.index] = m.result;
          current.index = null;
          finished++;
          try {
            options.onResult?.(m.result, m.index);
          } catch (e) {
            return fail(e as Error);
          }
          if (finished === tasks.length) return resolve();
          feed(w, current);
        });
        w.on('error', (e) => fail(e));
        w.on('exit', (code) => {
          const i = current.index;
          if (!failed && i !== null) fail(toError({ name: 'Error', message: `its worker thread stopped (exit code ${code})` }, tasks[i], i));
        });
        feed(w, current);
      }
    });
  } finally {
    if (onAbort) options.signal?.removeEventListener('abort', onAbort);
    await Promise.all(pool.map((w) => w.terminate()));
  }
  return results;
}

/**
 * The worker-thread side of threads/worker-pool.ts: a worker entry calls serveTasks once
 * with the function that runs one task. Tasks arrive one at a time; each answer carries
 * the task's index, and an error comes back as its class name, message and stack (Error
 * objects do not survive the structured clone). The stack is not for users: the pool keeps it
 * on the error it raises, so an internal error's crash file and --debug show where it began.
 */
import { parentPort } from 'node:worker_threads';

/** Parent → worker: one task. */
export interface TaskMessage<Task> {
  index: number;
  task: Task;
}

/** Worker → parent: progress of a task, its result, or its error. */
export type WorkerReply<Result, Progress> =
  | { index: number; progress: Progress }
  | { index: number; result: Result }
  | { index: number; error: { name: string; message: string; stack?: string } };

/** Run each task the pool sends with `run` (sync or async), posting progress, the result or the error. */
export function serveTasks<Task, Result, Progress = never>(run: (task: Task, progress: (p: Progress) => void) => Result | Promise<Result>): void {
  const port = parentPort;
  if (!port) throw new Error('serveTasks must run in a worker thread');
  const post = (m: WorkerReply<Result, Progress>) => port.postMessage(m);
  port.on('message', ({ index, task }: TaskMessage<Task>) => {
    const fail = (e: unknown) => {
      const err = e as Error;
      post({ index, error: { name: err?.name ?? 'Error', message: err?.message ?? String(e), stack: typeof err?.stack === 'string' ? err.stack : undefined } });
    };
    try {
      Promise.resolve(run(task, (progress) => post({ index, progress }))).then((result) => post({ index, result }), fail);
    } catch (e) {
      fail(e);
    }
  });
}

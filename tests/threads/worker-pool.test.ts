/**
 * The one worker pool (src/threads/worker-pool.ts, used by sweeps and by the network
 * estimator's seeds): results in submission order whatever order the workers finish in,
 * progress and errors carried back from the threads, every worker stopped on a failure or
 * an abort, and tasks not yet started never started (common practice, no source). The
 * workers are small entries written here on top of the built task-worker (dist/, built by
 * the global test setup); each task sleeps, so a later task can finish first.
 */
import { existsSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { beforeAll, describe, expect, it } from 'vitest';
import { PoolStopped, runInWorkers } from '../../src/threads/worker-pool.js';

const taskWorker = new URL('../../dist/threads/task-worker.js', import.meta.url).href;

interface Task {
  value: number;
  /** Milliseconds before answering. */
  sleep: number;
  fail?: 'throw' | 'exit';
}

let entry: URL;
let dir: string;

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'mesofield-pool-'));
  const file = join(dir, 'square-worker.mjs');
  // Squares the value after a sleep, reports progress once, and fails when asked to; leaves
  // a file when a task starts and when its sleep ends, so the test sees what ran.
  writeFileSync(
    file,
    `import { writeFileSync } from 'node:fs';
import { workerData } from 'node:worker_threads';
const { serveTasks } = await import(${JSON.stringify(taskWorker)});
const mark = (what, task) => workerData.marks && writeFileSync(workerData.marks + '/' + what + '-' + task.value, '');
serveTasks(async (task, progress) => {
  mark('started', task);
  progress({ started: task.value, offset: workerData.offset });
  await new Promise((r) => setTimeout(r, task.sleep));
  mark('slept', task);
  if (task.fail === 'throw') throw new RangeError('value ' + task.value + ' is not allowed');
  if (task.fail === 'exit') process.exit(7);
  return task.value * task.value + workerData.offset;
});
`,
  );
  entry = pathToFileURL(file);
});

describe('worker pool', () => {
  it('returns results in submission order and passes progress and each result on as it arrives', async () => {
    const tasks: Task[] = [600, 20, 120, 10, 60].map((sleep, i) => ({ value: i + 1, sleep }));
    const arrived: number[] = [];
    const progress: number[] = [];
    const results = await runInWorkers<Task, number, { started: number; offset: number }>(tasks, {
      entry,
      workerData: { offset: 0.5 },
      workers: 2,
      onResult: (r, i) => {
        expect(r).toBe(tasks[i].value ** 2 + 0.5);
        arrived.push(i);
      },
      onProgress: (p, i) => {
        expect(p).toEqual({ started: tasks[i].value, offset: 0.5 });
        progress.push(i);
      },
    });
    expect(results).toEqual([1.5, 4.5, 9.5, 16.5, 25.5]);
    expect([...arrived].sort()).toEqual([0, 1, 2, 3, 4]);
    // Task 0 sleeps longest: with two workers, later tasks finish before it.
    expect(arrived[0]).not.toBe(0);
    expect([...progress].sort()).toEqual([0, 1, 2, 3, 4]);
  }, 60_000);

  it('carries a task error back by class name and message, stops the running tasks and starts no further one', async () => {
    const marks = mkdtempSync(join(dir, 'marks-'));
    const tasks: Task[] = [
      { value: 1, sleep: 10 },
      { value: 2, sleep: 300, fail: 'throw' },
      ...Array.from({ length: 6 }, (_, i) => ({ value: 3 + i, sleep: 1500 })),
    ];
    const run = runInWorkers<Task, number>(tasks, { entry, workerData: { offset: 0, marks }, workers: 2 });
    await expect(run).rejects.toMatchObject({ name: 'RangeError', message: 'value 2 is not allowed' });
    await new Promise((r) => setTimeout(r, 1800));
    const has = (what: string, value: number) => existsSync(join(marks, `${what}-${value}`));
    expect(has('slept', 2)).toBe(true);
    // The other worker may have moved on to task 3 before task 2 failed; it was stopped in
    // its sleep. Nothing after that started.
    expect(has('slept', 3)).toBe(false);
    for (let v = 4; v <= 8; v++) expect(has('started', v), `task value ${v}`).toBe(false);
  }, 60_000);

  it('names the task whose worker exits, through the caller’s error', async () => {
    const tasks: Task[] = [
      { value: 1, sleep: 10 },
      { value: 2, sleep: 10, fail: 'exit' },
    ];
    const run = runInWorkers<Task, number>(tasks, {
      entry,
      workerData: { offset: 0 },
      workers: 2,
      toError: (e, task, i) => new Error(`task ${i} (value ${task.value}): ${e.message}`),
    });
    await expect(run).rejects.toThrow('task 1 (value 2): its worker thread stopped (exit code 7)');
  }, 60_000);

  it('stops on abort: rejects with PoolStopped, stops the running task and starts nothing after it', async () => {
    const marks = mkdtempSync(join(dir, 'marks-'));
    const tasks: Task[] = Array.from({ length: 8 }, (_, i) => ({ value: i, sleep: i === 0 ? 100 : 300 }));
    const stop = new AbortController();
    const arrived: number[] = [];
    const run = runInWorkers<Task, number>(tasks, {
      entry,
      workerData: { offset: 0, marks },
      workers: 2,
      signal: stop.signal,
      onResult: (_r, i) => {
        arrived.push(i);
        if (arrived.length === 2) stop.abort();
      },
    });
    await expect(run).rejects.toBeInstanceOf(PoolStopped);
    await new Promise((r) => setTimeout(r, 800));
    expect(arrived.length).toBe(2);
    // Two tasks at most were running when the stop came; they were stopped in their sleep,
    // and no task after them started.
    const has = (what: string, value: number) => existsSync(join(marks, `${what}-${value}`));
    expect(tasks.filter((t) => has('slept', t.value)).length).toBe(2);
    for (let v = 4; v < 8; v++) expect(has('started', v), `task value ${v}`).toBe(false);
    const before = new AbortController();
    before.abort();
    await expect(runInWorkers<Task, number>(tasks, { entry, workerData: { offset: 0 }, workers: 2, signal: before.signal })).rejects.toBeInstanceOf(PoolStopped);
  }, 60_000);
});

/**
 * Worker-thread entry of a sweep (solve-points.ts): solves the points the parent sends,
 * one at a time, and posts each row back. The config comes once, in workerData.
 */
import { workerData } from 'node:worker_threads';
import { serveTasks } from '../threads/task-worker.js';
import type { SweepPoint } from './grid.js';
import type { SweepPointResult } from './solve-point.js';
import { solveSweepPoint } from './solve-point.js';
import type { PointWorkerData } from './solve-points.js';

const { config } = workerData as PointWorkerData;
serveTasks<SweepPoint, SweepPointResult>((point) => solveSweepPoint(config, point));
